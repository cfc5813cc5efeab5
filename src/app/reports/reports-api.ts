import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { CreateReportRequest, ReportDto, ReportPage } from '../../../shared/api/reports';

const enc = encodeURIComponent;

/** Calls of the reports part of the REST API (DEVELOPERS.md, "REST API"). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class ReportsApi {
  private readonly http = inject(HttpClient);

  private base(benchId: string): string {
    return `/api/benches/${enc(benchId)}/reports`;
  }

  /** One page of the bench's saved reports, newest first. */
  list(benchId: string, page: { limit: number; offset: number }): Promise<ReportPage> {
    const params = new HttpParams().set('limit', page.limit).set('offset', page.offset);
    return firstValueFrom(this.http.get<ReportPage>(this.base(benchId), { params }));
  }

  get(benchId: string, reportId: string): Promise<ReportDto> {
    return firstValueFrom(this.http.get<ReportDto>(`${this.base(benchId)}/${enc(reportId)}`));
  }

  create(benchId: string, body: CreateReportRequest): Promise<ReportDto> {
    return firstValueFrom(this.http.post<ReportDto>(this.base(benchId), body));
  }

  /** The export file as the server writes it (`csv` or `json`), fetched with the sign-in token. */
  download(benchId: string, reportId: string, format: 'csv' | 'json'): Promise<Blob> {
    return firstValueFrom(this.http.get(`${this.base(benchId)}/${enc(reportId)}/export.${format}`, { responseType: 'blob' }));
  }
}
