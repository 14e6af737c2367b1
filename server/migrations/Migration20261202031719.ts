import { Migration } from '@mikro-orm/migrations';

export class Migration20261202031719 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `audit_entries` (`id` integer not null primary key autoincrement, `at` datetime not null, `actor_id` text null, `action` text not null, `record_type` text not null, `record_id` text not null, `before` json null, `after` json null)");
    this.addSql("create index `audit_entries_actor_id_index` on `audit_entries` (`actor_id`)");
    this.addSql("create index `audit_entries_record_type_record_id_index` on `audit_entries` (`record_type`, `record_id`)");
    this.addSql("create index `audit_entries_at_index` on `audit_entries` (`at`)");
    this.addSql("create table `crews` (`id` text not null, `name` text not null, `created_at` datetime not null, primary key (`id`))");
    this.addSql("create unique index `crews_name_unique` on `crews` (`name`)");
    this.addSql("create table `sessions` (`id` text not null, `user_id` text not null, `expires_at` datetime not null, `created_at` datetime not null, primary key (`id`))");
    this.addSql("create index `sessions_user_id_index` on `sessions` (`user_id`)");
    this.addSql("create table `users` (`id` text not null, `email` text not null, `name` text not null, `password_hash` text null, `roles` json not null, `unit_system` text not null default 'metric', `crew_id` text null, `active` integer not null default true, `created_at` datetime not null, `last_sign_in_at` datetime null, primary key (`id`))");
    this.addSql("create unique index `users_email_unique` on `users` (`email`)");
  }
}
