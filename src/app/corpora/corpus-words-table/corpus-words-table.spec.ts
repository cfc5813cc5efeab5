import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { apiErrorInterceptor } from '../../core/auth-interceptors';
import type { CorpusWordPage } from '../corpora-api';
import { CorpusWordsTable } from './corpus-words-table';

const URL_ = '/api/benches/b1/corpora/c1/words';
const page: CorpusWordPage = {
  total: 60,
  items: [
    { word: 'bee', count: 12, length: 3, split: 'train' },
    { word: 'marrow', count: 9, length: 6, split: 'test' },
  ],
};

async function setUp() {
  TestBed.configureTestingModule({
    imports: [CorpusWordsTable],
    providers: [
      provideZonelessChangeDetection(),
      provideHttpClient(withInterceptors([apiErrorInterceptor])),
      provideHttpClientTesting(),
    ],
  });
  const fixture = TestBed.createComponent(CorpusWordsTable);
  fixture.componentRef.setInput('benchId', 'b1');
  fixture.componentRef.setInput('corpusId', 'c1');
  const backend = TestBed.inject(HttpTestingController);
  const loader = TestbedHarnessEnvironment.loader(fixture);
  /** Waits for the next words request and answers it. */
  const next = async (answer: CorpusWordPage = page): Promise<TestRequest> => {
    let req: TestRequest | undefined;
    await vi.waitFor(async () => {
      await fixture.whenStable();
      const open = backend.match((r) => r.url === URL_);
      if (open.length === 0) throw new Error('no words request yet');
      req = open[open.length - 1];
    }, { timeout: 3000 });
    req!.flush(answer);
    await fixture.whenStable();
    return req!;
  };
  return { fixture, backend, loader, next };
}

const params = (req: TestRequest) => Object.fromEntries(req.request.params.keys().map((k) => [k, req.request.params.get(k)]));

describe('CorpusWordsTable', () => {
  it('asks the server for the most frequent words first and shows them with figures', async () => {
    const { loader, next } = await setUp();
    const first = await next();
    expect(params(first)).toEqual({ sort: 'count', dir: 'desc', offset: '0', limit: '25' });
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getCellTextByColumnName();
    expect(rows['word']!.text).toEqual(['bee', 'marrow']);
    expect(rows['length']!.text).toEqual(['3chars', '6chars']);
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 25 of 60');
  });

  it('sorts on the server when a header is clicked, and pages with offset', async () => {
    const { loader, next } = await setUp();
    await next();
    const sort = await loader.getHarness(MatSortHarness);
    await (await sort.getSortHeaders({ label: 'Word' }))[0]!.click();
    expect(params(await next())).toMatchObject({ sort: 'word', dir: 'asc', offset: '0' });
    await (await loader.getHarness(MatPaginatorHarness)).goToNextPage();
    expect(params(await next())).toMatchObject({ sort: 'word', dir: 'asc', offset: '25', limit: '25' });
  });

  it('filters by substring and split, starting again at the first page', async () => {
    const { loader, next } = await setUp();
    await next();
    await (await loader.getHarness(MatPaginatorHarness)).goToNextPage();
    expect(params(await next())).toMatchObject({ offset: '25' });
    await (await loader.getHarness(MatInputHarness.with({ selector: '.search input' }))).setValue('rr');
    const filtered = params(await next({ total: 1, items: [page.items[1]!] }));
    expect(filtered).toMatchObject({ q: 'rr', offset: '0' });
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'Test' });
    expect(params(await next())).toMatchObject({ q: 'rr', split: 'test', offset: '0' });
  });

  it('shows a sentence when the words cannot be loaded', async () => {
    const { fixture, backend } = await setUp();
    await vi.waitFor(async () => {
      await fixture.whenStable();
      backend.expectOne((r) => r.url === URL_).flush({ error: { code: 'NOT_FOUND', message: 'This corpus was not found, or you do not have access to it.' } }, { status: 404, statusText: 'Not Found' });
    });
    await vi.waitFor(async () => {
      await fixture.whenStable();
      expect((fixture.nativeElement as HTMLElement).querySelector('[role="alert"]')?.textContent).toContain('Could not load the words. This corpus was not found');
    });
  });
});
