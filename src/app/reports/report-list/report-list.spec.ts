import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { ReportPage, ReportSummaryDto } from '../../../../shared/api/reports';
import { apiErrorInterceptor } from '../../core/auth-interceptors';
import { ReportList } from './report-list';

const LIST_URL = '/api/benches/b1/reports';

function summary(over: Partial<ReportSummaryDto> & { id: string }): ReportSummaryDto {
  return {
    benchId: 'b1', kind: 'comparison', title: 'Untitled', sourceIds: [], createdBy: { id: 'u1', displayName: 'Ines Cove' },
    createdAt: '2026-03-01T09:00:00.000Z', link: `/benches/b1/reports/${over.id}`, ...over,
  };
}

const twoReports: ReportPage = {
  total: 30,
  items: [
    summary({ id: 'r2', title: 'State sizes 8–32', kind: 'grid', createdAt: '2026-03-02T10:15:00.000Z' }),
    summary({ id: 'r1', title: 'Tiny SSM, step 120', kind: 'evaluation', createdBy: null }),
  ],
};

async function setUp() {
  TestBed.configureTestingModule({
    imports: [ReportList],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(ReportList);
  fixture.componentRef.setInput('benchId', 'b1');
  const backend = TestBed.inject(HttpTestingController);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  /** Waits for the next list request and answers it (the bench request of the shell is answered too). */
  const next = async (answer: ReportPage | { status: number; body: object } = twoReports): Promise<TestRequest> => {
    let req: TestRequest | undefined;
    await vi.waitFor(async () => {
      await fixture.whenStable();
      for (const b of backend.match('/api/benches/b1')) b.flush({ id: 'b1', name: 'Tide pool', description: '', role: 'viewer', memberCount: 3, createdAt: '2026-03-01T09:00:00.000Z' });
      const open = backend.match((r) => r.url === LIST_URL);
      if (open.length === 0) throw new Error('no list request yet');
      req = open[open.length - 1];
    }, { timeout: 3000 });
    if ('items' in answer) req!.flush(answer);
    else req!.flush(answer.body, { status: answer.status, statusText: 'Error' });
    await fixture.whenStable();
    return req!;
  };
  return { fixture, loader, next };
}

const params = (req: TestRequest) => Object.fromEntries(req.request.params.keys().map((k) => [k, req.request.params.get(k)]));

describe('ReportList', () => {
  it('shows a row per report with title link, kind, creator and date, asking for the first page', async () => {
    const { fixture, loader, next } = await setUp();
    const first = await next();
    expect(params(first)).toEqual({ limit: '25', offset: '0' });
    const table = await loader.getHarness(MatTableHarness);
    const cells = await table.getCellTextByColumnName();
    expect(cells['title']!.text).toEqual(['State sizes 8–32', 'Tiny SSM, step 120']);
    expect(cells['kind']!.text).toEqual(['Grid', 'Evaluation']);
    expect(cells['createdBy']!.text).toEqual(['Ines Cove', '(account removed)']);
    // Dates are shown in the test machine's time zone: compare with the same format built here.
    const local = (iso: string) => {
      const d = new Date(iso);
      const two = (n: number) => String(n).padStart(2, '0');
      return `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())} ${two(d.getHours())}:${two(d.getMinutes())}`;
    };
    expect(cells['createdAt']!.text).toEqual([local('2026-03-02T10:15:00.000Z'), local('2026-03-01T09:00:00.000Z')]);
    const links = [...(fixture.nativeElement as HTMLElement).querySelectorAll<HTMLAnchorElement>('td a')].map((a) => a.getAttribute('href'));
    expect(links).toEqual(['/benches/b1/reports/r2', '/benches/b1/reports/r1']);
    expect((fixture.nativeElement as HTMLElement).textContent).not.toContain('No reports yet');
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 25 of 30');
  });

  it('asks for the next page with an offset', async () => {
    const { loader, next } = await setUp();
    await next();
    const paginator = await loader.getHarness(MatPaginatorHarness);
    await paginator.goToNextPage();
    const second = await next({ total: 30, items: [summary({ id: 'r0', title: 'Oldest' })] });
    expect(params(second)).toEqual({ limit: '25', offset: '25' });
    const cells = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(cells['title']!.text).toEqual(['Oldest']);
  });

  it('says so when the bench has no reports', async () => {
    const { fixture, loader, next } = await setUp();
    await next({ total: 0, items: [] });
    const rows = await (await loader.getHarness(MatTableHarness)).getRows();
    expect(rows).toHaveLength(0);
    expect((fixture.nativeElement as HTMLElement).querySelector('.nw-empty')?.textContent).toContain('No reports yet.');
  });

  it('shows the server’s sentence when the list cannot be loaded, not the empty state', async () => {
    const { fixture, next } = await setUp();
    await next({ status: 422, body: { error: { code: 'VALIDATION_FAILED', message: 'Give a limit of at most 200.', fields: { limit: 'Give a limit of at most 200.' } } } });
    const el = fixture.nativeElement as HTMLElement;
    await vi.waitFor(async () => {
      await fixture.whenStable();
      expect(el.querySelector('[role="alert"]')?.textContent).toContain('The reports could not be loaded. Give a limit of at most 200.');
    });
    expect(el.querySelector('.nw-empty')).toBeNull();
  });
});
