// The entity definitions and the migrations describe the same schema: a database built by the migrations has
// nothing left for the schema generator to change (else `npm run db:migration:create` would write a migration that
// undoes an earlier one, as it once would have re-created two dropped word indexes).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase, type Orm } from './orm';

let orm: Orm;
beforeAll(async () => { orm = await openDatabase(':memory:'); });
afterAll(async () => orm.close(true));

describe('entities and migrations', () => {
  it('agree: the migrated database needs no schema change', async () => {
    const sql = await orm.getSchemaGenerator().getUpdateSchemaSQL({ wrap: false });
    expect(sql.trim()).toBe('');
  });

  it('keep the descending word-order indexes the words page and the export read by', async () => {
    const rows: { name: string }[] = await orm.em.getConnection().execute(`select name from sqlite_master where type = 'index' and tbl_name = 'corpus_words' order by name`);
    const names = rows.map((r) => r.name);
    expect(names).toContain('corpus_words_corpus_id_count_word_index');
    expect(names).toContain('corpus_words_corpus_id_length_word_index');
    expect(names).not.toContain('corpus_words_corpus_id_index');
  });
});
