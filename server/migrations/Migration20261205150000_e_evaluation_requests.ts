import { Migration } from '@mikro-orm/migrations';

/** Evaluations sent to runners: one row per request, waiting, held under a lease, then finished or failed. */
export class Migration20261205150000EEvaluationRequests extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`evaluation_requests\` (\`id\` text not null, \`bench_id\` text not null, \`run_id\` text not null, \`checkpoint_id\` text null, \`checkpoint_step\` integer not null, \`created_by_id\` text null, \`settings\` json not null, \`settings_key\` text not null, \`status\` text not null default 'waiting', \`status_reason\` text null, \`runner_id\` text null, \`lease_expires_at\` datetime null, \`stage\` json null, \`evaluation_id\` text null, \`created_at\` datetime not null, \`updated_at\` datetime not null, constraint \`evaluation_requests_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`evaluation_requests_run_id_foreign\` foreign key(\`run_id\`) references \`runs\`(\`id\`) on delete cascade on update cascade, constraint \`evaluation_requests_checkpoint_id_foreign\` foreign key(\`checkpoint_id\`) references \`checkpoints\`(\`id\`) on delete set null on update cascade, constraint \`evaluation_requests_created_by_id_foreign\` foreign key(\`created_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, constraint \`evaluation_requests_runner_id_foreign\` foreign key(\`runner_id\`) references \`runners\`(\`id\`) on delete set null on update cascade, constraint \`evaluation_requests_evaluation_id_foreign\` foreign key(\`evaluation_id\`) references \`evaluations\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`evaluation_requests_bench_id_index\` on \`evaluation_requests\` (\`bench_id\`);`);
    this.addSql(`create index \`evaluation_requests_run_id_index\` on \`evaluation_requests\` (\`run_id\`);`);
    this.addSql(`create index \`evaluation_requests_checkpoint_id_index\` on \`evaluation_requests\` (\`checkpoint_id\`);`);
    this.addSql(`create index \`evaluation_requests_created_by_id_index\` on \`evaluation_requests\` (\`created_by_id\`);`);
    this.addSql(`create index \`evaluation_requests_runner_id_index\` on \`evaluation_requests\` (\`runner_id\`);`);
    this.addSql(`create index \`evaluation_requests_evaluation_id_index\` on \`evaluation_requests\` (\`evaluation_id\`);`);
    this.addSql(`create index \`evaluation_requests_status_created_at_index\` on \`evaluation_requests\` (\`status\`, \`created_at\`);`);
    this.addSql(`create index \`evaluation_requests_checkpoint_id_settings_key_index\` on \`evaluation_requests\` (\`checkpoint_id\`, \`settings_key\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop table if exists `evaluation_requests`;');
  }
}
