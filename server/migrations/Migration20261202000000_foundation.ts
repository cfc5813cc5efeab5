import { Migration } from '@mikro-orm/migrations';

/** Users, benches, memberships, invitations, password-reset tokens and the activity log. */
export class Migration20261202000000Foundation extends Migration {
  override async up(): Promise<void> {
    this.addSql(`create table \`benches\` (\`id\` text not null, \`name\` text not null, \`description\` text not null default '', \`created_at\` datetime not null, \`updated_at\` datetime not null, primary key (\`id\`));`);

    this.addSql(`create table \`users\` (\`id\` text not null, \`email\` text not null, \`display_name\` text not null, \`password_hash\` text not null, \`is_admin\` integer not null default false, \`token_version\` integer not null default 0, \`created_at\` datetime not null, \`updated_at\` datetime not null, primary key (\`id\`));`);
    this.addSql(`create unique index \`users_email_unique\` on \`users\` (\`email\`);`);

    this.addSql(`create table \`password_reset_tokens\` (\`id\` text not null, \`user_id\` text not null, \`token_hash\` text not null, \`created_at\` datetime not null, \`expires_at\` datetime not null, \`used_at\` datetime null, constraint \`password_reset_tokens_user_id_foreign\` foreign key(\`user_id\`) references \`users\`(\`id\`) on delete cascade on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`password_reset_tokens_user_id_index\` on \`password_reset_tokens\` (\`user_id\`);`);
    this.addSql(`create unique index \`password_reset_tokens_token_hash_unique\` on \`password_reset_tokens\` (\`token_hash\`);`);

    this.addSql(`create table \`memberships\` (\`id\` text not null, \`bench_id\` text not null, \`user_id\` text not null, \`role\` text not null, \`created_at\` datetime not null, constraint \`memberships_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`memberships_user_id_foreign\` foreign key(\`user_id\`) references \`users\`(\`id\`) on delete cascade on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`memberships_bench_id_index\` on \`memberships\` (\`bench_id\`);`);
    this.addSql(`create index \`memberships_user_id_index\` on \`memberships\` (\`user_id\`);`);
    this.addSql(`create unique index \`memberships_bench_id_user_id_unique\` on \`memberships\` (\`bench_id\`, \`user_id\`);`);

    this.addSql(`create table \`invitations\` (\`id\` text not null, \`bench_id\` text not null, \`email\` text not null, \`role\` text not null, \`token_hash\` text not null, \`invited_by_id\` text null, \`created_at\` datetime not null, \`expires_at\` datetime not null, \`accepted_at\` datetime null, \`accepted_by_id\` text null, \`revoked_at\` datetime null, constraint \`invitations_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`invitations_invited_by_id_foreign\` foreign key(\`invited_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, constraint \`invitations_accepted_by_id_foreign\` foreign key(\`accepted_by_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`invitations_bench_id_index\` on \`invitations\` (\`bench_id\`);`);
    this.addSql(`create unique index \`invitations_token_hash_unique\` on \`invitations\` (\`token_hash\`);`);
    this.addSql(`create index \`invitations_invited_by_id_index\` on \`invitations\` (\`invited_by_id\`);`);
    this.addSql(`create index \`invitations_accepted_by_id_index\` on \`invitations\` (\`accepted_by_id\`);`);
    this.addSql(`create index \`invitations_bench_id_email_index\` on \`invitations\` (\`bench_id\`, \`email\`);`);

    this.addSql(`create table \`activity_events\` (\`id\` text not null, \`bench_id\` text not null, \`actor_id\` text null, \`kind\` text not null, \`summary\` text not null, \`created_at\` datetime not null, constraint \`activity_events_bench_id_foreign\` foreign key(\`bench_id\`) references \`benches\`(\`id\`) on delete cascade on update cascade, constraint \`activity_events_actor_id_foreign\` foreign key(\`actor_id\`) references \`users\`(\`id\`) on delete set null on update cascade, primary key (\`id\`));`);
    this.addSql(`create index \`activity_events_bench_id_index\` on \`activity_events\` (\`bench_id\`);`);
    this.addSql(`create index \`activity_events_actor_id_index\` on \`activity_events\` (\`actor_id\`);`);
    this.addSql(`create index \`activity_events_bench_id_created_at_index\` on \`activity_events\` (\`bench_id\`, \`created_at\`);`);
  }

  override async down(): Promise<void> {
    this.addSql('drop table if exists `activity_events`;');
    this.addSql('drop table if exists `invitations`;');
    this.addSql('drop table if exists `memberships`;');
    this.addSql('drop table if exists `password_reset_tokens`;');
    this.addSql('drop table if exists `users`;');
    this.addSql('drop table if exists `benches`;');
  }
}
