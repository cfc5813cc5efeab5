import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import {
  AcceptInvitationResponse, ActivityPage, BenchSummary, Invitation, InvitationPreview, Member, Role,
} from '../core/api-types';

/** Calls of the bench part of the REST API (DEVELOPERS.md). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class BenchesApi {
  private readonly http = inject(HttpClient);

  list(): Promise<BenchSummary[]> {
    return firstValueFrom(this.http.get<BenchSummary[]>('/api/benches'));
  }

  create(name: string, description: string): Promise<BenchSummary> {
    return firstValueFrom(this.http.post<BenchSummary>('/api/benches', { name, description }));
  }

  get(benchId: string): Promise<BenchSummary> {
    return firstValueFrom(this.http.get<BenchSummary>(`/api/benches/${encodeURIComponent(benchId)}`));
  }

  update(benchId: string, changes: { name?: string; description?: string }): Promise<BenchSummary> {
    return firstValueFrom(this.http.patch<BenchSummary>(`/api/benches/${encodeURIComponent(benchId)}`, changes));
  }

  remove(benchId: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(`/api/benches/${encodeURIComponent(benchId)}`));
  }

  members(benchId: string): Promise<Member[]> {
    return firstValueFrom(this.http.get<Member[]>(`/api/benches/${encodeURIComponent(benchId)}/members`));
  }

  changeRole(benchId: string, userId: string, role: Role): Promise<unknown> {
    return firstValueFrom(this.http.patch(
      `/api/benches/${encodeURIComponent(benchId)}/members/${encodeURIComponent(userId)}`, { role }));
  }

  removeMember(benchId: string, userId: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(
      `/api/benches/${encodeURIComponent(benchId)}/members/${encodeURIComponent(userId)}`));
  }

  invitations(benchId: string): Promise<Invitation[]> {
    return firstValueFrom(this.http.get<Invitation[]>(`/api/benches/${encodeURIComponent(benchId)}/invitations`));
  }

  invite(benchId: string, email: string, role: Role): Promise<Invitation> {
    return firstValueFrom(this.http.post<Invitation>(
      `/api/benches/${encodeURIComponent(benchId)}/invitations`, { email, role }));
  }

  revokeInvitation(benchId: string, invitationId: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(
      `/api/benches/${encodeURIComponent(benchId)}/invitations/${encodeURIComponent(invitationId)}`));
  }

  activity(benchId: string, limit: number, offset: number): Promise<ActivityPage> {
    const params = new HttpParams().set('limit', limit).set('offset', offset);
    return firstValueFrom(this.http.get<ActivityPage>(
      `/api/benches/${encodeURIComponent(benchId)}/activity`, { params }));
  }

  previewInvitation(token: string): Promise<InvitationPreview> {
    return firstValueFrom(this.http.get<InvitationPreview>(`/api/invitations/${encodeURIComponent(token)}`));
  }

  acceptInvitation(token: string): Promise<AcceptInvitationResponse> {
    return firstValueFrom(this.http.post<AcceptInvitationResponse>(
      `/api/invitations/${encodeURIComponent(token)}/accept`, {}));
  }
}
