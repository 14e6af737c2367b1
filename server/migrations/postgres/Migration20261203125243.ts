import { Migration } from '@mikro-orm/migrations';

export class Migration20261203125243 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table \"missions\" (\"id\" varchar not null, \"name\" varchar not null, \"status\" varchar not null default 'planned', \"planner_id\" varchar not null, \"drone_profile_id\" varchar not null, \"harvester_profile_id\" varchar not null, \"input\" jsonb not null, \"plan\" jsonb not null, \"feasible\" boolean not null default true, \"depart_at\" varchar not null, \"depart_date\" varchar not null, \"stale\" boolean not null default false, \"stale_reasons\" jsonb not null, \"stale_since\" timestamptz null, \"authorised_at\" timestamptz null, \"authorised_by_id\" varchar null, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"missions_pkey\" primary key (\"id\"))");
    this.addSql("create index \"missions_planner_id_index\" on \"missions\" (\"planner_id\")");
    this.addSql("create index \"missions_stale_index\" on \"missions\" (\"stale\")");
    this.addSql("create index \"missions_created_at_index\" on \"missions\" (\"created_at\")");
    this.addSql("create table \"mission_perches\" (\"id\" varchar not null, \"mission_id\" varchar not null, \"seq\" int not null, \"span_id\" varchar not null, \"line_id\" varchar not null, \"span_version\" int not null, \"lat\" double precision not null, \"lon\" double precision not null, constraint \"mission_perches_pkey\" primary key (\"id\"))");
    this.addSql("create index \"mission_perches_mission_id_index\" on \"mission_perches\" (\"mission_id\")");
    this.addSql("create index \"mission_perches_span_id_index\" on \"mission_perches\" (\"span_id\")");
    this.addSql("alter table \"mission_perches\" add constraint \"mission_perches_mission_id_seq_unique\" unique (\"mission_id\", \"seq\")");
  }
}
