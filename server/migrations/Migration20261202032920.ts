import { Migration } from '@mikro-orm/migrations';

export class Migration20261202032920 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `invitations` (`id` text not null, `email` text not null, `name` text not null, `roles` json not null, `crew_id` text null, `token_hash` text not null, `expires_at` datetime not null, `invited_by_id` text not null, `created_at` datetime not null, `accepted_at` datetime null, `revoked_at` datetime null, `user_id` text null, primary key (`id`))");
    this.addSql("create index `invitations_email_index` on `invitations` (`email`)");
    this.addSql("create unique index `invitations_token_hash_unique` on `invitations` (`token_hash`)");
    this.addSql("create table `outbox_messages` (`id` integer not null primary key autoincrement, `to` text not null, `subject` text not null, `text` text not null, `html` text null, `sent_at` datetime not null, `via` text not null)");
    this.addSql("create index `outbox_messages_sent_at_index` on `outbox_messages` (`sent_at`)");
    this.addSql("create table `password_resets` (`id` text not null, `user_id` text not null, `token_hash` text not null, `expires_at` datetime not null, `created_at` datetime not null, `used_at` datetime null, primary key (`id`))");
    this.addSql("create index `password_resets_user_id_index` on `password_resets` (`user_id`)");
    this.addSql("create unique index `password_resets_token_hash_unique` on `password_resets` (`token_hash`)");
  }
}
