import { Pipe, PipeTransform } from '@angular/core';
import { Role } from '../core/api-types';

const LABELS: Record<Role, string> = { owner: 'Owner', coach: 'Coach', member: 'Member', viewer: 'Viewer' };

/** What each role may do, in one line (shown beside role pickers). */
export const ROLE_HINTS: Record<Role, string> = {
  owner: 'everything, including renaming and deleting the bench',
  coach: 'invites people and manages members and viewers',
  member: 'uploads corpora and trains runs',
  viewer: 'looks at corpora, runs and reports',
};

@Pipe({ name: 'roleLabel' })
export class RoleLabelPipe implements PipeTransform {
  transform(role: Role | null | undefined): string {
    return role ? LABELS[role] : '';
  }
}
