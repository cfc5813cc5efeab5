import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import { BenchSummary } from '../../core/api-types';
import { apiErrorInterceptor, authTokenInterceptor } from '../../core/auth-interceptors';
import { BenchList } from './bench-list';

function bench(i: number, name: string, memberCount: number, role: BenchSummary['role']): BenchSummary {
  return { id: `b${i}`, name, description: '', role, memberCount, createdAt: `2026-0${(i % 9) + 1}-15T10:00:00Z` };
}

async function setUp() {
  TestBed.configureTestingModule({
    imports: [BenchList],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(BenchList);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const backend = TestBed.inject(HttpTestingController);
  await fixture.whenStable();
  return { fixture, loader, backend };
}

describe('BenchList', () => {
  it('lists the benches sorted by name, with member counts in figures and units', async () => {
    const { fixture, loader, backend } = await setUp();
    backend.expectOne('/api/benches').flush([
      bench(1, 'Surnames', 12, 'coach'), bench(2, 'alpine villages', 1, 'owner'), bench(3, 'Brand ideas', 30, 'viewer'),
    ]);
    await vi.waitFor(async () => {
      await fixture.whenStable();
      expect((await (await loader.getHarness(MatTableHarness)).getRows()).length).toBe(3);
    });
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['name'].text).toEqual(['alpine villages', 'Brand ideas', 'Surnames']);
    expect(rows['role'].text).toEqual(['Owner', 'Viewer', 'Coach']);
    expect(rows['memberCount'].text).toEqual(['1person', '30people', '12people']);

    const sort = await loader.getHarness(MatSortHarness);
    const members = (await sort.getSortHeaders({ label: 'Members' }))[0];
    await members.click();
    expect((await table.getCellTextByColumnName())['name'].text).toEqual(['alpine villages', 'Surnames', 'Brand ideas']);
    await members.click();
    expect((await table.getCellTextByColumnName())['memberCount'].text).toEqual(['30people', '12people', '1person']);
  });

  it('pages long lists ten at a time', async () => {
    const { fixture, loader, backend } = await setUp();
    backend.expectOne('/api/benches').flush(
      Array.from({ length: 23 }, (_, i) => bench(i, `Bench ${String(i).padStart(2, '0')}`, i + 1, 'member')),
    );
    await vi.waitFor(async () => {
      await fixture.whenStable();
      expect((await (await loader.getHarness(MatTableHarness)).getRows()).length).toBe(10);
    });
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 10 of 23');
    await paginator.goToLastPage();
    const rows = await (await loader.getHarness(MatTableHarness)).getCellTextByColumnName();
    expect(rows['name'].text).toEqual(['Bench 20', 'Bench 21', 'Bench 22']);
  });

  it('says what to do when the list cannot be loaded, and tells a newcomer how to get a bench', async () => {
    const { fixture, backend } = await setUp();
    backend.expectOne('/api/benches').flush(null, { status: 0, statusText: 'Unknown Error' });
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const alert = (fixture.nativeElement as HTMLElement).querySelector('[role=alert]');
      expect(alert?.textContent).toContain('Cannot reach the Noisewright server');
    });
    (fixture.nativeElement as HTMLElement).querySelector<HTMLButtonElement>('[role=alert] button')?.click();
    backend.expectOne('/api/benches').flush([]);
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const empty = (fixture.nativeElement as HTMLElement).querySelector('[data-testid=no-benches]');
      expect(empty?.textContent).toContain('ask a bench owner or coach to invite');
    });
  });
});
