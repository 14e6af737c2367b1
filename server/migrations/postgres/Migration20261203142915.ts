import { Migration } from '@mikro-orm/migrations';

export class Migration20261203142915 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table \"rate_limit_hits\" (\"key\" varchar not null, \"hits\" int not null, \"reset_at\" bigint not null, constraint \"rate_limit_hits_pkey\" primary key (\"key\"))");
  }
}
