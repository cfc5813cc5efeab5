/** Helpers for the corpora specs: multipart uploads and row counts of the corpus tables. */
import request from 'supertest';
import type { CorpusOptionsInput } from '../../../shared/api/corpora';
import { bearer, countRows, type TestApp } from '../../testing/test-app';

export function upload(
  t: TestApp,
  benchId: string,
  token: string,
  file: { name: string; content: string | Uint8Array },
  opts: { options?: CorpusOptionsInput; name?: string; description?: string; preview?: boolean } = {},
) {
  const url = `/api/benches/${benchId}/corpora${opts.preview ? '/preview' : ''}`;
  const body = typeof file.content === 'string' ? Buffer.from(file.content, 'utf8') : Buffer.from(file.content);
  let req = request(t.app).post(url).set(bearer(token)).attach('file', body, file.name);
  if (opts.options !== undefined) req = req.field('options', JSON.stringify(opts.options));
  if (!opts.preview) req = req.field('name', opts.name ?? 'Test corpus');
  if (opts.description !== undefined) req = req.field('description', opts.description);
  return req;
}

export async function corpusRowCounts(t: TestApp): Promise<{ corpora: number; words: number; activity: number }> {
  return {
    corpora: await countRows(t, 'corpora'),
    words: await countRows(t, 'corpus_words'),
    activity: await countRows(t, 'activity_events'),
  };
}

export async function savedWords(t: TestApp, corpusId: string): Promise<{ word: string; count: number; split: string; length: number }[]> {
  return t.orm.em.fork().getConnection().execute('select word, `count`, split, `length` from corpus_words where corpus_id = ? order by word', [corpusId]);
}
