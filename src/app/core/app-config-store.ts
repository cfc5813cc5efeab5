import { HttpClient } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { PublicConfig } from './api-types';

/** The server's public settings (`GET /api/config`), fetched once. */
@Injectable({ providedIn: 'root' })
export class AppConfigStore {
  private readonly http = inject(HttpClient);
  private readonly state = signal<PublicConfig | null>(null);
  private pending: Promise<PublicConfig | null> | null = null;

  readonly config = this.state.asReadonly();

  load(): Promise<PublicConfig | null> {
    this.pending ??= firstValueFrom(this.http.get<PublicConfig>('/api/config')).then(
      (config) => {
        this.state.set(config);
        return config;
      },
      () => {
        this.pending = null;
        return null;
      },
    );
    return this.pending;
  }
}
