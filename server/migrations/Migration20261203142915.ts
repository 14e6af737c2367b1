import { Migration } from '@mikro-orm/migrations';

export class Migration20261203142915 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `rate_limit_hits` (`key` text not null, `hits` integer not null, `reset_at` bigint not null, primary key (`key`))");
  }
}
