import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

/** The caution shown where word lists enter or leave the server (upload and export). */
@Component({
  selector: 'nw-personal-data-caution',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <div class="nw-hint-box caution" role="note">
      <mat-icon>privacy_tip</mat-icon>
      <span>
        @if (mode() === 'upload') {
          Word lists can contain personal data, such as people's names. Uploading stores the list on this server,
          where every member of the bench can read and export it; upload only lists you may share with them.
        } @else {
          This list may contain personal data, such as people's names; keep the exported file where only people
          allowed to see it can read it.
        }
        Words a model generates from it can collide with real names or trademarks; check them before using them publicly.
      </span>
    </div>
  `,
  styles: `.caution { display: flex; gap: 10px; align-items: flex-start; } mat-icon { flex: none; }`,
})
export class PersonalDataCaution {
  readonly mode = input<'upload' | 'export'>('upload');
}
