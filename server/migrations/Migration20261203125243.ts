import { Migration } from '@mikro-orm/migrations';

export class Migration20261203125243 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `missions` (`id` text not null, `name` text not null, `status` text not null default 'planned', `planner_id` text not null, `drone_profile_id` text not null, `harvester_profile_id` text not null, `input` json not null, `plan` json not null, `feasible` integer not null default true, `depart_at` text not null, `depart_date` text not null, `stale` integer not null default false, `stale_reasons` json not null, `stale_since` datetime null, `authorised_at` datetime null, `authorised_by_id` text null, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create index `missions_planner_id_index` on `missions` (`planner_id`)");
    this.addSql("create index `missions_stale_index` on `missions` (`stale`)");
    this.addSql("create index `missions_created_at_index` on `missions` (`created_at`)");
    this.addSql("create table `mission_perches` (`id` text not null, `mission_id` text not null, `seq` integer not null, `span_id` text not null, `line_id` text not null, `span_version` integer not null, `lat` double not null, `lon` double not null, primary key (`id`))");
    this.addSql("create index `mission_perches_mission_id_index` on `mission_perches` (`mission_id`)");
    this.addSql("create index `mission_perches_span_id_index` on `mission_perches` (`span_id`)");
    this.addSql("create unique index `mission_perches_mission_id_seq_unique` on `mission_perches` (`mission_id`, `seq`)");
  }
}
