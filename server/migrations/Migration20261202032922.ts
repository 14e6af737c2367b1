import { Migration } from '@mikro-orm/migrations';

export class Migration20261202032922 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `zones` (`id` text not null, `name` text not null, `reason` text not null, `severity` text not null, `geometry` json not null, `valid_from` text null, `valid_to` text null, `created_by_id` text not null, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
  }
}
