import { Migration } from '@mikro-orm/migrations';

/** Runs of a bench, their metric points (one row per run, series and step) and checkpoints (bytes as a BLOB). */
export class Migration20261202024709Runs extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`runs\` (\`id\` text not null, \`bench_id\` text not null, \`corpus_id\` text null, \`created_by_id\` text null, \`name\` text not null, \`family\` text not null, \`settings\` json not null, \`alphabet\` json not null, \`status\` text not null, \`status_reason\` text null, \`summary\` json not null, \`steps_done\` integer not null default 0, \`archived\` integer not null default false, \`best_bound_bits_per_char\` double null, \`created_at\` datetime not null, \`updated_at\` datetime not null, constraint \`runs_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`runs_corpus_id_foreign\` foreign key(\`corpus_id\`) references \`corpora\`(\`id\`) on delete set null on update cascade, constraint \`runs_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`runs_bench_id_index\` on \`runs\` (\`bench_id\`);`);
    this.addSql(`create index \`runs_corpus_id_index\` on \`runs\` (\`corpus_id\`);`);
    this.addSql(`create index \`runs_created_by_id_index\` on \`runs\` (\`created_by_id\`);`);
    this.addSql(`create index \`runs_bench_id_created_at_index\` on \`runs\` (\`bench_id\`, \`created_at\`);`);
    this.addSql(`create index \`runs_bench_id_status_index\` on \`runs\` (\`bench_id\`, \`status\`);`);

    this.addSql(`create table \`metric_points\` (\`id\` integer not null primary key autoincrement, \`run_id\` text not null, \`series\` text not null, \`step\` integer not null, \`value\` double not null, constraint \`metric_points_run_id_foreign\` foreign key(\`run_id\`) references \`runs\`(\`id\`) on delete cascade on update cascade);`);
    this.addSql(`create unique index \`metric_points_run_id_series_step_unique\` on \`metric_points\` (\`run_id\`, \`series\`, \`step\`);`);

    this.addSql(`create table \`checkpoints\` (\`id\` text not null, \`run_id\` text not null, \`step\` integer not null, \`bound_bits_per_char\` double null, \`reason\` text not null, \`format_version\` integer not null, \`byte_size\` integer not null, \`bytes\` blob not null, \`created_at\` datetime not null, constraint \`checkpoints_run_id_foreign\` foreign key(\`run_id\`) references \`runs\`(\`id\`) on delete cascade on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`checkpoints_run_id_index\` on \`checkpoints\` (\`run_id\`);`);
    this.addSql(`create index \`checkpoints_run_id_created_at_index\` on \`checkpoints\` (\`run_id\`, \`created_at\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop table if exists `checkpoints`;');
    this.addSql('drop table if exists `metric_points`;');
    this.addSql('drop table if exists `runs`;');
  }
}
