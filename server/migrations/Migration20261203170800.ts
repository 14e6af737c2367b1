import { Migration } from '@mikro-orm/migrations';

export class Migration20261203170800 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `jobs` (`id` text not null, `kind` text not null, `reason` text not null, `payload` text not null, `state` text not null, `done` integer not null default 0, `total` integer not null default 0, `error` text null, `result` text null, `coalesce_key` text null, `once_key` text null, `attempts` integer not null default 0, `owner` text null, `lease_until` bigint null, `created_at` bigint not null, `started_at` bigint null, `finished_at` bigint null, primary key (`id`))");
    this.addSql("create unique index `jobs_once_key_unique` on `jobs` (`once_key`)");
    this.addSql("create index `jobs_state_created_idx` on `jobs` (`state`, `created_at`)");
    this.addSql("create index `jobs_created_idx` on `jobs` (`created_at`)");
  }
}
