import { Migration } from '@mikro-orm/migrations';

export class Migration20261203170800 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table \"jobs\" (\"id\" varchar not null, \"kind\" varchar not null, \"reason\" text not null, \"payload\" text not null, \"state\" varchar not null, \"done\" int not null default 0, \"total\" int not null default 0, \"error\" text null, \"result\" text null, \"coalesce_key\" varchar null, \"once_key\" varchar null, \"attempts\" int not null default 0, \"owner\" varchar null, \"lease_until\" bigint null, \"created_at\" bigint not null, \"started_at\" bigint null, \"finished_at\" bigint null, constraint \"jobs_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"jobs\" add constraint \"jobs_once_key_unique\" unique (\"once_key\")");
    this.addSql("create index \"jobs_state_created_idx\" on \"jobs\" (\"state\", \"created_at\")");
    this.addSql("create index \"jobs_created_idx\" on \"jobs\" (\"created_at\")");
  }
}
