import { Migration } from '@mikro-orm/migrations';

export class Migration20261203102803 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `pending_work` (`key` text not null, `kind` text not null, `payload` text not null, `reason` text not null, `requested_at` bigint not null, primary key (`key`))");
  }
}
