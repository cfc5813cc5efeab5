import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { CreateGridRequest, GridDto, GridSummaryDto, LearnabilityRequest, LearnabilityVerdict } from '../../../shared/api/grids';

const enc = encodeURIComponent;

/** Calls of the grids part of the REST API (DEVELOPERS.md, "REST API"). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class GridsApi {
  private readonly http = inject(HttpClient);

  private base(benchId: string): string {
    return `/api/benches/${enc(benchId)}/grids`;
  }

  list(benchId: string): Promise<GridSummaryDto[]> {
    return firstValueFrom(this.http.get<GridSummaryDto[]>(this.base(benchId)));
  }

  get(benchId: string, gridId: string): Promise<GridDto> {
    return firstValueFrom(this.http.get<GridDto>(`${this.base(benchId)}/${enc(gridId)}`));
  }

  create(benchId: string, body: CreateGridRequest): Promise<GridDto> {
    return firstValueFrom(this.http.post<GridDto>(this.base(benchId), body));
  }

  verdict(benchId: string, gridId: string): Promise<LearnabilityVerdict> {
    return firstValueFrom(this.http.get<LearnabilityVerdict>(`${this.base(benchId)}/${enc(gridId)}/verdict`));
  }

  /** Starts a learnability check on a corpus: a grid of kind `learnability` whose runs are queued. */
  learnability(benchId: string, corpusId: string, body: LearnabilityRequest): Promise<GridDto> {
    return firstValueFrom(this.http.post<GridDto>(`/api/benches/${enc(benchId)}/corpora/${enc(corpusId)}/learnability`, body));
  }
}
