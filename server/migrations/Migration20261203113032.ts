import { Migration } from '@mikro-orm/migrations';

export class Migration20261203113032 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `idempotency_keys` (`id` text not null, `user_id` text not null, `key` text not null, `request_hash` text not null, `state` text not null default 'pending', `response_status` integer null, `response_body` text null, `created_at` datetime not null, `expires_at` datetime not null, primary key (`id`))");
    this.addSql("create index `idempotency_keys_expires_at_index` on `idempotency_keys` (`expires_at`)");
    this.addSql("create unique index `idempotency_keys_user_id_key_unique` on `idempotency_keys` (`user_id`, `key`)");
  }
}
