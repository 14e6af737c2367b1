import { Migration } from '@mikro-orm/migrations';

export class Migration20261203113759 extends Migration {
  override async up(): Promise<void> {
    this.addSql("alter table `spans` add column `lowest_clearance_along_m` double null");
  }
}
