import { Migration } from '@mikro-orm/migrations';

/** Runners (token hashes, heartbeats) and the runner columns of runs: placement, holder, lease, live progress, requested control. */
export class Migration20261205102200RunnersB extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`runners\` (\`id\` text not null, \`name\` text not null, \`kind\` text not null, \`token_hash\` text not null, \`created_at\` datetime not null, \`revoked_at\` datetime null, \`last_heartbeat_at\` datetime null, \`threads\` integer null, \`jobs_done\` integer not null default 0, \`reported_jobs\` json not null, \`steps_per_second\` double null, primary key (\`id\`));`);
    this.addSql(`create unique index \`runners_token_hash_unique\` on \`runners\` (\`token_hash\`);`);

    this.addSql(`alter table \`runs\` add column \`placement\` text not null default 'tab';`);
    this.addSql(`alter table \`runs\` add column \`runner_id\` text null constraint \`runs_runner_id_foreign\` references \`runners\` (\`id\`) on update cascade on delete set null;`);
    this.addSql(`alter table \`runs\` add column \`lease_expires_at\` datetime null;`);
    this.addSql(`alter table \`runs\` add column \`live\` json null;`);
    this.addSql(`alter table \`runs\` add column \`requested_control\` text null;`);
    this.addSql(`create index \`runs_runner_id_index\` on \`runs\` (\`runner_id\`);`);
    this.addSql(`create index \`runs_placement_status_index\` on \`runs\` (\`placement\`, \`status\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop index if exists `runs_placement_status_index`;');
    this.addSql('drop index if exists `runs_runner_id_index`;');
    this.addSql('alter table `runs` drop column `requested_control`;');
    this.addSql('alter table `runs` drop column `live`;');
    this.addSql('alter table `runs` drop column `lease_expires_at`;');
    this.addSql('alter table `runs` drop column `runner_id`;');
    this.addSql('alter table `runs` drop column `placement`;');
    this.addSql('drop table if exists `runners`;');
  }
}
