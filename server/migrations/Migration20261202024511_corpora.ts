import { Migration } from '@mikro-orm/migrations';

/** Corpora of a bench and their words (word, count, split, length). */
export class Migration20261202024511Corpora extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`corpora\` (\`id\` text not null, \`bench_id\` text not null, \`name\` text not null, \`description\` text not null default '', \`uploaded_by_id\` text null, \`file_name\` text not null, \`format\` text not null, \`options\` json not null, \`split_train\` double not null, \`split_validation\` double not null, \`split_test\` double not null, \`split_seed\` integer not null, \`alphabet\` json not null, \`stats\` json not null, \`normalisation\` json null, \`types\` integer not null, \`tokens\` integer not null, \`created_at\` datetime not null, \`updated_at\` datetime not null, constraint \`corpora_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`corpora_uploaded_by_id_foreign\` foreign key(\`uploaded_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`corpora_bench_id_index\` on \`corpora\` (\`bench_id\`);`);
    this.addSql(`create index \`corpora_uploaded_by_id_index\` on \`corpora\` (\`uploaded_by_id\`);`);
    this.addSql(`create index \`corpora_bench_id_created_at_index\` on \`corpora\` (\`bench_id\`, \`created_at\`);`);

    this.addSql(`create table \`corpus_words\` (\`id\` integer not null primary key autoincrement, \`corpus_id\` text not null, \`word\` text not null, \`count\` integer not null, \`split\` text not null, \`length\` integer not null, constraint \`corpus_words_corpus_id_foreign\` foreign key(\`corpus_id\`) references \`corpora\`(\`id\`) on delete cascade on update cascade);`);
    this.addSql(`create index \`corpus_words_corpus_id_index\` on \`corpus_words\` (\`corpus_id\`);`);
    this.addSql(`create index \`corpus_words_corpus_id_split_index\` on \`corpus_words\` (\`corpus_id\`, \`split\`);`);
    this.addSql(`create index \`corpus_words_corpus_id_count_index\` on \`corpus_words\` (\`corpus_id\`, \`count\`);`);
    this.addSql(`create unique index \`corpus_words_corpus_id_word_unique\` on \`corpus_words\` (\`corpus_id\`, \`word\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop table if exists `corpus_words`;');
    this.addSql('drop table if exists `corpora`;');
  }
}
