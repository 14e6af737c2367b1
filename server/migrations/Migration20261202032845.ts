import { Migration } from '@mikro-orm/migrations';

export class Migration20261202032845 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `assessments` (`id` integer not null primary key autoincrement, `span_id` text not null, `harvester_profile_id` text not null, `drone_profile_id` text not null, `perchable` integer not null, `score` double not null, `harvest_w` double not null, `charge_time_min` double null, `conductor_temp_c` double not null, `ampacity_a` double not null, `result` json not null, `inputs` json not null, `method_version` text not null, `settings_version` integer not null, `harvester_version` integer not null, `drone_version` integer not null, `computed_at` datetime not null)");
    this.addSql("create index `assessments_span_id_index` on `assessments` (`span_id`)");
    this.addSql("create index `assessments_harvester_profile_id_drone_profile_id_harvest_w_index` on `assessments` (`harvester_profile_id`, `drone_profile_id`, `harvest_w`)");
    this.addSql("create unique index `assessments_span_id_harvester_profile_id_drone_profile_id_unique` on `assessments` (`span_id`, `harvester_profile_id`, `drone_profile_id`)");
    this.addSql("create table `bench_tests` (`id` text not null, `harvester_profile_id` text not null, `fixture_turns` integer not null, `fixture_current_a` double not null, `load_voltage_rms_v` double not null, `load_ohm` double not null, `frequency_hz` double not null, `note` text null, `created_by_id` text null, `created_at` datetime not null, primary key (`id`))");
    this.addSql("create index `bench_tests_harvester_profile_id_index` on `bench_tests` (`harvester_profile_id`)");
    this.addSql("create table `drone_profiles` (`id` text not null, `name` text not null, `battery_wh` double not null, `reserve_percent` double not null, `cruise_speed_mps` double not null, `wind_limit_mps` double not null, `payload_kg` double not null, `approach_clearance_m` double not null, `active` integer not null default true, `sort_order` integer not null default 0, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create unique index `drone_profiles_name_unique` on `drone_profiles` (`name`)");
    this.addSql("create table `harvester_profiles` (`id` text not null, `name` text not null, `core_material` text not null, `turns` integer not null, `core_area_mm2` double not null, `path_length_mm` double not null, `relative_permeability` double not null, `air_gap_mm` double not null, `saturation_t` double not null, `winding_resistance_ohm` double not null, `converter_efficiency` double not null, `mass_kg` double not null, `gripper_min_diameter_mm` double not null, `gripper_max_diameter_mm` double not null, `contact_temp_limit_c` double not null, `useful_min_harvest_w` double not null, `active` integer not null default true, `sort_order` integer not null default 0, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create unique index `harvester_profiles_name_unique` on `harvester_profiles` (`name`)");
    this.addSql("create table `scoring_settings` (`version` integer not null, `settings` json not null, `created_by_id` text null, `created_at` datetime not null, primary key (`version`))");
  }
}
