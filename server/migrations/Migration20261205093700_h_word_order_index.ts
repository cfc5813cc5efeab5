import { Migration } from '@mikro-orm/migrations';

/** The words page sorts by count (then word): an index in that order spares a sort of the whole corpus per page. */
export class Migration20261205093700HWordOrderIndex extends Migration {
  override async up(): Promise<void> {
    this.addSql('create index `corpus_words_corpus_id_count_word_index` on `corpus_words` (`corpus_id`, `count` desc, `word`);');
    this.addSql('create index `corpus_words_corpus_id_length_word_index` on `corpus_words` (`corpus_id`, `length` desc, `word`);');
  }

  override async down(): Promise<void> {
    this.addSql('drop index if exists `corpus_words_corpus_id_count_word_index`;');
    this.addSql('drop index if exists `corpus_words_corpus_id_length_word_index`;');
  }
}
