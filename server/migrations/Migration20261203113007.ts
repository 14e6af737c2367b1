import { Migration } from '@mikro-orm/migrations';

export class Migration20261203113007 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `flight_records` (`id` text not null, `file_name` text not null, `format` text not null, `mission_id` text null, `span_id` text null, `harvester_profile_id` text not null, `uploaded_by_id` text not null, `uploaded_at` datetime not null, `started_at` text not null, `ended_at` text not null, `offset_min` integer not null, `point_count` integer not null, `track` json not null, primary key (`id`))");
    this.addSql("create index `flight_records_mission_id_index` on `flight_records` (`mission_id`)");
    this.addSql("create table `perch_events` (`id` text not null, `flight_record_id` text not null, `kind` text not null, `span_id` text null, `line_id` text null, `start_at` text not null, `end_at` text not null, `duration_s` double not null, `lat` double not null, `lon` double not null, `span_distance_m` double null, `measured_w` double null, `predicted_w` double null, `predicted_source` text null, `line_current_a` double null, `implied_current_a` double null, `metered_current_a` double null, `battery_start_pct` double null, `battery_end_pct` double null, `note` text null, primary key (`id`))");
    this.addSql("create index `perch_events_flight_record_id_index` on `perch_events` (`flight_record_id`)");
    this.addSql("create index `perch_events_span_id_index` on `perch_events` (`span_id`)");
  }
}
