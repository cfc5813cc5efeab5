import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { DeleteAccountRequest } from '../../../shared/api/schemas';

/** Calls about the signed-in person's own account that are not part of signing in. */
@Injectable({ providedIn: 'root' })
export class AccountApi {
  private readonly http = inject(HttpClient);

  /** DELETE /api/auth/account → 204; refusals come back as ApiError (422 fields, 409 sentence). */
  async deleteAccount(body: DeleteAccountRequest): Promise<void> {
    await firstValueFrom(this.http.delete<void>('/api/auth/account', { body }));
  }
}
