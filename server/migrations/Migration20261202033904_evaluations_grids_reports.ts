import { Migration } from '@mikro-orm/migrations';

/** Stored evaluations of checkpoints, grids of runs (and learnability checks) with the runs' grid cell, and reports. */
export class Migration20261202033904EvaluationsGridsReports extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`reports\` (\`id\` text not null, \`bench_id\` text not null, \`kind\` text not null, \`title\` text not null, \`source_ids\` json not null, \`snapshot\` json not null, \`created_by_id\` text null, \`created_at\` datetime not null, constraint \`reports_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`reports_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`reports_bench_id_index\` on \`reports\` (\`bench_id\`);`);
    this.addSql(`create index \`reports_created_by_id_index\` on \`reports\` (\`created_by_id\`);`);
    this.addSql(`create index \`reports_bench_id_created_at_index\` on \`reports\` (\`bench_id\`, \`created_at\`);`);

    this.addSql(`create table \`grids\` (\`id\` text not null, \`bench_id\` text not null, \`corpus_id\` text null, \`name\` text not null, \`kind\` text not null, \`family\` text null, \`axes\` json not null, \`base_settings\` json not null, \`figure\` text not null, \`budget_steps\` integer null, \`created_by_id\` text null, \`created_at\` datetime not null, constraint \`grids_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`grids_corpus_id_foreign\` foreign key(\`corpus_id\`) references \`corpora\`(\`id\`) on delete set null on update cascade, constraint \`grids_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`grids_bench_id_index\` on \`grids\` (\`bench_id\`);`);
    this.addSql(`create index \`grids_corpus_id_index\` on \`grids\` (\`corpus_id\`);`);
    this.addSql(`create index \`grids_created_by_id_index\` on \`grids\` (\`created_by_id\`);`);
    this.addSql(`create index \`grids_bench_id_created_at_index\` on \`grids\` (\`bench_id\`, \`created_at\`);`);

    this.addSql(`create table \`evaluations\` (\`id\` text not null, \`bench_id\` text not null, \`run_id\` text not null, \`checkpoint_id\` text null, \`checkpoint_step\` integer not null, \`created_by_id\` text null, \`settings\` json not null, \`settings_key\` text not null, \`results\` json not null, \`headline\` json not null, \`created_at\` datetime not null, constraint \`evaluations_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`evaluations_run_id_foreign\` foreign key(\`run_id\`) references \`runs\`(\`id\`) on delete cascade on update cascade, constraint \`evaluations_checkpoint_id_foreign\` foreign key(\`checkpoint_id\`) references \`checkpoints\`(\`id\`) on delete set null on update cascade, constraint \`evaluations_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`evaluations_bench_id_index\` on \`evaluations\` (\`bench_id\`);`);
    this.addSql(`create index \`evaluations_run_id_index\` on \`evaluations\` (\`run_id\`);`);
    this.addSql(`create index \`evaluations_checkpoint_id_index\` on \`evaluations\` (\`checkpoint_id\`);`);
    this.addSql(`create index \`evaluations_created_by_id_index\` on \`evaluations\` (\`created_by_id\`);`);
    this.addSql(`create index \`evaluations_bench_id_created_at_index\` on \`evaluations\` (\`bench_id\`, \`created_at\`);`);
    this.addSql(`create index \`evaluations_checkpoint_id_settings_key_index\` on \`evaluations\` (\`checkpoint_id\`, \`settings_key\`);`);

    this.addSql(`alter table \`runs\` add column \`grid_id\` text null constraint \`runs_grid_id_foreign\` references \`grids\` (\`id\`) on update cascade on delete set null;`);
    this.addSql(`alter table \`runs\` add column \`grid_cell\` json null;`);
    this.addSql(`create index \`runs_grid_id_index\` on \`runs\` (\`grid_id\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop index if exists `runs_grid_id_index`;');
    this.addSql('alter table `runs` drop column `grid_cell`;');
    this.addSql('alter table `runs` drop column `grid_id`;');
    this.addSql('drop table if exists `evaluations`;');
    this.addSql('drop table if exists `grids`;');
    this.addSql('drop table if exists `reports`;');
  }
}
