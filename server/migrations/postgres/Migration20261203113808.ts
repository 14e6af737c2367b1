import { Migration } from '@mikro-orm/migrations';
import { ACSR_CONDUCTORS } from '../../../shared/engineering/conductors.ts';
import { DEFAULT_HAZARD_KINDS } from '../../modules/inventory/catalogues.ts';

// PostgreSQL: every table as the SQLite migrations up to Migration20261203113808 leave them, and the same catalogue
// rows (conductors, hazard kinds). Later migrations come in pairs of the same name, one per dialect.
export class Migration20261203113808 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table \"assessments\" (\"id\" serial primary key, \"span_id\" varchar not null, \"harvester_profile_id\" varchar not null, \"drone_profile_id\" varchar not null, \"perchable\" boolean not null, \"score\" double precision not null, \"harvest_w\" double precision not null, \"charge_time_min\" double precision null, \"conductor_temp_c\" double precision not null, \"ampacity_a\" double precision not null, \"result\" jsonb not null, \"inputs\" jsonb not null, \"method_version\" varchar not null, \"settings_version\" int not null, \"harvester_version\" int not null, \"drone_version\" int not null, \"computed_at\" timestamptz not null)");
    this.addSql("create index \"assessments_span_id_index\" on \"assessments\" (\"span_id\")");
    this.addSql("create index \"assessments_computed_at_index\" on \"assessments\" (\"computed_at\")");
    this.addSql("create index \"assessments_harvester_profile_id_drone_profile_id__64c50_index\" on \"assessments\" (\"harvester_profile_id\", \"drone_profile_id\", \"harvest_w\")");
    this.addSql("alter table \"assessments\" add constraint \"assessments_span_id_harvester_profile_id_drone_pr_f866a_unique\" unique (\"span_id\", \"harvester_profile_id\", \"drone_profile_id\")");
    this.addSql("create table \"audit_entries\" (\"id\" serial primary key, \"at\" timestamptz not null, \"actor_id\" varchar null, \"action\" varchar not null, \"record_type\" varchar not null, \"record_id\" varchar not null, \"before\" jsonb null, \"after\" jsonb null)");
    this.addSql("create index \"audit_entries_actor_id_index\" on \"audit_entries\" (\"actor_id\")");
    this.addSql("create index \"audit_entries_record_type_record_id_index\" on \"audit_entries\" (\"record_type\", \"record_id\")");
    this.addSql("create index \"audit_entries_at_index\" on \"audit_entries\" (\"at\")");
    this.addSql("create table \"bench_tests\" (\"id\" varchar not null, \"harvester_profile_id\" varchar not null, \"fixture_turns\" int not null, \"fixture_current_a\" double precision not null, \"load_voltage_rms_v\" double precision not null, \"load_ohm\" double precision not null, \"frequency_hz\" double precision not null, \"note\" text null, \"created_by_id\" varchar null, \"created_at\" timestamptz not null, constraint \"bench_tests_pkey\" primary key (\"id\"))");
    this.addSql("create index \"bench_tests_harvester_profile_id_index\" on \"bench_tests\" (\"harvester_profile_id\")");
    this.addSql("create table \"conductor_types\" (\"code_word\" varchar not null, \"size\" varchar not null, \"stranding\" varchar not null, \"material\" varchar not null, \"diameter_mm\" double precision not null, \"resistance_dc20ohm_per_m\" double precision not null, \"resistance_ac25ohm_per_m\" double precision not null, \"resistance_ac75ohm_per_m\" double precision not null, \"weight_kg_per_m\" double precision null, constraint \"conductor_types_pkey\" primary key (\"code_word\"))");
    this.addSql("create table \"crews\" (\"id\" varchar not null, \"name\" varchar not null, \"created_at\" timestamptz not null, constraint \"crews_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"crews\" add constraint \"crews_name_unique\" unique (\"name\")");
    this.addSql("create table \"drone_profiles\" (\"id\" varchar not null, \"name\" varchar not null, \"battery_wh\" double precision not null, \"reserve_percent\" double precision not null, \"cruise_speed_mps\" double precision not null, \"wind_limit_mps\" double precision not null, \"payload_kg\" double precision not null, \"approach_clearance_m\" double precision not null, \"cruise_power_w\" double precision not null default 300, \"perch_manoeuvre_wh\" double precision not null default 3, \"charge_efficiency\" double precision not null default 0.95, \"charge_to_percent\" double precision not null default 100, \"active\" boolean not null default true, \"sort_order\" int not null default 0, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"drone_profiles_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"drone_profiles\" add constraint \"drone_profiles_name_unique\" unique (\"name\")");
    this.addSql("create table \"flight_records\" (\"id\" varchar not null, \"file_name\" varchar not null, \"format\" varchar not null, \"mission_id\" varchar null, \"span_id\" varchar null, \"harvester_profile_id\" varchar not null, \"uploaded_by_id\" varchar not null, \"uploaded_at\" timestamptz not null, \"started_at\" varchar not null, \"ended_at\" varchar not null, \"offset_min\" int not null, \"point_count\" int not null, \"track\" jsonb not null, constraint \"flight_records_pkey\" primary key (\"id\"))");
    this.addSql("create index \"flight_records_mission_id_index\" on \"flight_records\" (\"mission_id\")");
    this.addSql("create table \"harvester_profiles\" (\"id\" varchar not null, \"name\" varchar not null, \"core_material\" varchar not null, \"turns\" int not null, \"core_area_mm2\" double precision not null, \"path_length_mm\" double precision not null, \"relative_permeability\" double precision not null, \"air_gap_mm\" double precision not null, \"saturation_t\" double precision not null, \"winding_resistance_ohm\" double precision not null, \"converter_efficiency\" double precision not null, \"mass_kg\" double precision not null, \"gripper_min_diameter_mm\" double precision not null, \"gripper_max_diameter_mm\" double precision not null, \"contact_temp_limit_c\" double precision not null, \"useful_min_harvest_w\" double precision not null, \"active\" boolean not null default true, \"sort_order\" int not null default 0, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"harvester_profiles_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"harvester_profiles\" add constraint \"harvester_profiles_name_unique\" unique (\"name\")");
    this.addSql("create table \"hazards\" (\"id\" varchar not null, \"span_id\" varchar not null, \"kind_id\" varchar not null, \"severity\" varchar not null, \"position_along_m\" double precision null, \"note\" text not null default '', \"created_at\" timestamptz not null, constraint \"hazards_pkey\" primary key (\"id\"))");
    this.addSql("create index \"hazards_span_id_index\" on \"hazards\" (\"span_id\")");
    this.addSql("create index \"hazards_kind_id_index\" on \"hazards\" (\"kind_id\")");
    this.addSql("create table \"hazard_kinds\" (\"id\" varchar not null, \"label\" varchar not null, \"default_severity\" varchar not null, \"active\" boolean not null default true, constraint \"hazard_kinds_pkey\" primary key (\"id\"))");
    this.addSql("create table \"idempotency_keys\" (\"id\" varchar not null, \"user_id\" varchar not null, \"key\" varchar(200) not null, \"request_hash\" varchar(64) not null, \"state\" varchar(16) not null default 'pending', \"response_status\" int null, \"response_body\" text null, \"created_at\" timestamptz not null, \"expires_at\" timestamptz not null, constraint \"idempotency_keys_pkey\" primary key (\"id\"))");
    this.addSql("create index \"idempotency_keys_expires_at_index\" on \"idempotency_keys\" (\"expires_at\")");
    this.addSql("alter table \"idempotency_keys\" add constraint \"idempotency_keys_user_id_key_unique\" unique (\"user_id\", \"key\")");
    this.addSql("create table \"invitations\" (\"id\" varchar not null, \"email\" varchar not null, \"name\" varchar not null, \"roles\" jsonb not null, \"crew_id\" varchar null, \"token_hash\" varchar not null, \"expires_at\" timestamptz not null, \"invited_by_id\" varchar not null, \"created_at\" timestamptz not null, \"accepted_at\" timestamptz null, \"revoked_at\" timestamptz null, \"user_id\" varchar null, constraint \"invitations_pkey\" primary key (\"id\"))");
    this.addSql("create index \"invitations_email_index\" on \"invitations\" (\"email\")");
    this.addSql("alter table \"invitations\" add constraint \"invitations_token_hash_unique\" unique (\"token_hash\")");
    this.addSql("create table \"lines\" (\"id\" varchar not null, \"name\" varchar not null, \"owner\" varchar not null, \"voltage_kv\" double precision not null, \"frequency_hz\" int not null, \"phases\" int not null default 3, \"load_typical_a\" double precision not null, \"load_min_a\" double precision not null, \"load_peak_a\" double precision not null, \"load_profile_a\" jsonb null, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"lines_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"lines\" add constraint \"lines_name_unique\" unique (\"name\")");
    this.addSql("create table \"load_series\" (\"line_id\" varchar not null, \"first_at\" varchar not null, \"last_at\" varchar not null, \"reading_count\" int not null, \"day_count\" int not null, \"imported_by_id\" varchar not null, \"imported_at\" timestamptz not null, constraint \"load_series_pkey\" primary key (\"line_id\"))");
    this.addSql("create table \"load_series_days\" (\"line_id\" varchar not null, \"day\" varchar not null, \"reading_count\" int not null, \"readings\" bytea not null, constraint \"load_series_days_pkey\" primary key (\"line_id\", \"day\"))");
    this.addSql("create table \"outbox_messages\" (\"id\" serial primary key, \"to\" varchar not null, \"subject\" varchar not null, \"text\" text not null, \"html\" text null, \"sent_at\" timestamptz not null, \"via\" varchar not null)");
    this.addSql("create index \"outbox_messages_sent_at_index\" on \"outbox_messages\" (\"sent_at\")");
    this.addSql("create table \"password_resets\" (\"id\" varchar not null, \"user_id\" varchar not null, \"token_hash\" varchar not null, \"expires_at\" timestamptz not null, \"created_at\" timestamptz not null, \"used_at\" timestamptz null, constraint \"password_resets_pkey\" primary key (\"id\"))");
    this.addSql("create index \"password_resets_user_id_index\" on \"password_resets\" (\"user_id\")");
    this.addSql("alter table \"password_resets\" add constraint \"password_resets_token_hash_unique\" unique (\"token_hash\")");
    this.addSql("create table \"pending_work\" (\"key\" varchar not null, \"kind\" varchar not null, \"payload\" text not null, \"reason\" varchar not null, \"requested_at\" bigint not null, constraint \"pending_work_pkey\" primary key (\"key\"))");
    this.addSql("create table \"perch_events\" (\"id\" varchar not null, \"flight_record_id\" varchar not null, \"kind\" varchar not null, \"span_id\" varchar null, \"line_id\" varchar null, \"start_at\" varchar not null, \"end_at\" varchar not null, \"duration_s\" double precision not null, \"lat\" double precision not null, \"lon\" double precision not null, \"span_distance_m\" double precision null, \"measured_w\" double precision null, \"predicted_w\" double precision null, \"predicted_source\" varchar null, \"line_current_a\" double precision null, \"implied_current_a\" double precision null, \"metered_current_a\" double precision null, \"battery_start_pct\" double precision null, \"battery_end_pct\" double precision null, \"note\" text null, constraint \"perch_events_pkey\" primary key (\"id\"))");
    this.addSql("create index \"perch_events_flight_record_id_index\" on \"perch_events\" (\"flight_record_id\")");
    this.addSql("create index \"perch_events_span_id_index\" on \"perch_events\" (\"span_id\")");
    this.addSql("create table \"photos\" (\"id\" varchar not null, \"span_id\" varchar null, \"hazard_id\" varchar null, \"uploader_id\" varchar not null, \"lat\" double precision null, \"lon\" double precision null, \"altitude_m\" double precision null, \"bearing_deg\" double precision null, \"bearing_ref\" varchar null, \"taken_at\" varchar null, \"taken_at_has_offset\" boolean not null default false, \"position_source\" varchar null, \"content_type\" varchar not null, \"width\" int not null, \"height\" int not null, \"bytes\" int not null, \"storage_key\" varchar not null, \"created_at\" timestamptz not null, constraint \"photos_pkey\" primary key (\"id\"))");
    this.addSql("create index \"photos_span_id_index\" on \"photos\" (\"span_id\")");
    this.addSql("create index \"photos_hazard_id_index\" on \"photos\" (\"hazard_id\")");
    this.addSql("create index \"photos_uploader_id_index\" on \"photos\" (\"uploader_id\")");
    this.addSql("alter table \"photos\" add constraint \"photos_storage_key_unique\" unique (\"storage_key\")");
    this.addSql("create table \"scoring_settings\" (\"version\" int not null, \"settings\" jsonb not null, \"created_by_id\" varchar null, \"created_at\" timestamptz not null, constraint \"scoring_settings_pkey\" primary key (\"version\"))");
    this.addSql("create table \"sessions\" (\"id\" varchar not null, \"user_id\" varchar not null, \"expires_at\" timestamptz not null, \"created_at\" timestamptz not null, constraint \"sessions_pkey\" primary key (\"id\"))");
    this.addSql("create index \"sessions_user_id_index\" on \"sessions\" (\"user_id\")");
    this.addSql("create table \"spans\" (\"id\" varchar not null, \"line_id\" varchar not null, \"from_structure_id\" varchar not null, \"to_structure_id\" varchar not null, \"status\" varchar not null default 'draft', \"version\" int not null default 1, \"length_m\" double precision not null, \"conductor_code_word\" varchar null, \"conductor_size\" varchar null, \"conductor_material\" varchar null, \"conductor_diameter_mm\" double precision null, \"conductor_resistance_low_ohm_per_m\" double precision null, \"conductor_temp_low_c\" double precision null, \"conductor_resistance_high_ohm_per_m\" double precision null, \"conductor_temp_high_c\" double precision null, \"phase_position\" varchar null, \"clearance_m\" double precision null, \"lowest_clearance_m\" double precision null, \"lowest_clearance_along_m\" double precision null, \"terrain\" varchar null, \"load_current_a\" double precision null, \"survey_date\" varchar null, \"surveyor_id\" varchar null, \"return_reason\" text null, \"suspend_reason\" text null, \"submitted_at\" timestamptz null, \"approved_at\" timestamptz null, \"approved_by_id\" varchar null, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"spans_pkey\" primary key (\"id\"))");
    this.addSql("create index \"spans_line_id_index\" on \"spans\" (\"line_id\")");
    this.addSql("create index \"spans_surveyor_id_index\" on \"spans\" (\"surveyor_id\")");
    this.addSql("create index \"spans_status_index\" on \"spans\" (\"status\")");
    this.addSql("create index \"spans_updated_at_index\" on \"spans\" (\"updated_at\")");
    this.addSql("create index \"spans_from_structure_id_index\" on \"spans\" (\"from_structure_id\")");
    this.addSql("create index \"spans_to_structure_id_index\" on \"spans\" (\"to_structure_id\")");
    this.addSql("alter table \"spans\" add constraint \"spans_line_id_from_structure_id_to_structure_id_unique\" unique (\"line_id\", \"from_structure_id\", \"to_structure_id\")");
    this.addSql("create table \"structures\" (\"id\" varchar not null, \"line_id\" varchar not null, \"lat\" double precision not null, \"lon\" double precision not null, \"kind\" varchar not null, \"label\" varchar not null, \"attachment_height_m\" double precision not null, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"structures_pkey\" primary key (\"id\"))");
    this.addSql("create index \"structures_line_id_index\" on \"structures\" (\"line_id\")");
    this.addSql("create index \"structures_updated_at_index\" on \"structures\" (\"updated_at\")");
    this.addSql("alter table \"structures\" add constraint \"structures_line_id_label_unique\" unique (\"line_id\", \"label\")");
    this.addSql("create table \"users\" (\"id\" varchar not null, \"email\" varchar not null, \"name\" varchar not null, \"password_hash\" varchar null, \"roles\" jsonb not null, \"unit_system\" varchar not null default 'metric', \"crew_id\" varchar null, \"active\" boolean not null default true, \"created_at\" timestamptz not null, \"last_sign_in_at\" timestamptz null, constraint \"users_pkey\" primary key (\"id\"))");
    this.addSql("alter table \"users\" add constraint \"users_email_unique\" unique (\"email\")");
    this.addSql("create table \"zones\" (\"id\" varchar not null, \"name\" varchar not null, \"reason\" text not null, \"severity\" varchar not null, \"geometry\" jsonb not null, \"valid_from\" varchar null, \"valid_to\" varchar null, \"created_by_id\" varchar not null, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"zones_pkey\" primary key (\"id\"))");
    const knex = this.getKnex();
    this.addSql(
      knex
        .insert(
          ACSR_CONDUCTORS.map((c) => ({
            code_word: c.codeWord,
            size: c.size,
            stranding: c.stranding,
            material: c.family,
            diameter_mm: c.diameterMm,
            resistance_dc20ohm_per_m: c.resistanceDc20OhmPerM,
            resistance_ac25ohm_per_m: c.resistanceAc25OhmPerM,
            resistance_ac75ohm_per_m: c.resistanceAc75OhmPerM,
            weight_kg_per_m: c.weightKgPerM ?? null,
          })),
        )
        .into('conductor_types')
        .onConflict()
        .ignore(),
    );
    this.addSql(
      knex
        .insert(DEFAULT_HAZARD_KINDS.map((k) => ({ id: k.id, label: k.label, default_severity: k.defaultSeverity, active: true })))
        .into('hazard_kinds')
        .onConflict()
        .ignore(),
    );
  }
}
