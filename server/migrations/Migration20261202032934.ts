import { Migration } from '@mikro-orm/migrations';

export class Migration20261202032934 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `conductor_types` (`code_word` text not null, `size` text not null, `stranding` text not null, `material` text not null, `diameter_mm` double not null, `resistance_dc20ohm_per_m` double not null, `resistance_ac25ohm_per_m` double not null, `resistance_ac75ohm_per_m` double not null, `weight_kg_per_m` double null, primary key (`code_word`))");
    this.addSql("create table `hazards` (`id` text not null, `span_id` text not null, `kind_id` text not null, `severity` text not null, `position_along_m` double null, `note` text not null default '', `created_at` datetime not null, primary key (`id`))");
    this.addSql("create index `hazards_span_id_index` on `hazards` (`span_id`)");
    this.addSql("create index `hazards_kind_id_index` on `hazards` (`kind_id`)");
    this.addSql("create table `hazard_kinds` (`id` text not null, `label` text not null, `default_severity` text not null, `active` integer not null default true, primary key (`id`))");
    this.addSql("create table `lines` (`id` text not null, `name` text not null, `owner` text not null, `voltage_kv` double not null, `frequency_hz` integer not null, `phases` integer not null default 3, `load_typical_a` double not null, `load_min_a` double not null, `load_peak_a` double not null, `load_profile_a` json null, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create unique index `lines_name_unique` on `lines` (`name`)");
    this.addSql("create table `spans` (`id` text not null, `line_id` text not null, `from_structure_id` text not null, `to_structure_id` text not null, `status` text not null default 'draft', `version` integer not null default 1, `length_m` double not null, `conductor_code_word` text null, `conductor_size` text null, `conductor_material` text null, `conductor_diameter_mm` double null, `conductor_resistance_low_ohm_per_m` double null, `conductor_temp_low_c` double null, `conductor_resistance_high_ohm_per_m` double null, `conductor_temp_high_c` double null, `phase_position` text null, `clearance_m` double null, `lowest_clearance_m` double null, `terrain` text null, `load_current_a` double null, `survey_date` text null, `surveyor_id` text null, `return_reason` text null, `suspend_reason` text null, `submitted_at` datetime null, `approved_at` datetime null, `approved_by_id` text null, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create index `spans_line_id_index` on `spans` (`line_id`)");
    this.addSql("create index `spans_surveyor_id_index` on `spans` (`surveyor_id`)");
    this.addSql("create index `spans_status_index` on `spans` (`status`)");
    this.addSql("create index `spans_updated_at_index` on `spans` (`updated_at`)");
    this.addSql("create index `spans_from_structure_id_index` on `spans` (`from_structure_id`)");
    this.addSql("create index `spans_to_structure_id_index` on `spans` (`to_structure_id`)");
    this.addSql("create unique index `spans_line_id_from_structure_id_to_structure_id_unique` on `spans` (`line_id`, `from_structure_id`, `to_structure_id`)");
    this.addSql("create table `structures` (`id` text not null, `line_id` text not null, `lat` double not null, `lon` double not null, `kind` text not null, `label` text not null, `attachment_height_m` double not null, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create index `structures_line_id_index` on `structures` (`line_id`)");
    this.addSql("create unique index `structures_line_id_label_unique` on `structures` (`line_id`, `label`)");
  }
}
