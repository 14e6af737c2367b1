import { Migration } from '@mikro-orm/migrations';

export class Migration20261202033100 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `photos` (`id` text not null, `span_id` text null, `hazard_id` text null, `uploader_id` text not null, `lat` double null, `lon` double null, `altitude_m` double null, `bearing_deg` double null, `bearing_ref` text null, `taken_at` text null, `taken_at_has_offset` integer not null default false, `position_source` text null, `content_type` text not null, `width` integer not null, `height` integer not null, `bytes` integer not null, `storage_key` text not null, `created_at` datetime not null, primary key (`id`))");
    this.addSql("create index `photos_span_id_index` on `photos` (`span_id`)");
    this.addSql("create index `photos_hazard_id_index` on `photos` (`hazard_id`)");
    this.addSql("create index `photos_uploader_id_index` on `photos` (`uploader_id`)");
    this.addSql("create unique index `photos_storage_key_unique` on `photos` (`storage_key`)");
  }
}
