import { Migration } from '@mikro-orm/migrations';

export class Migration20261203124918 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `line_permissions` (`id` text not null, `line_id` text not null, `reference` text not null, `valid_from` text not null, `valid_to` text not null, `conditions` text not null default '', `document_key` text null, `document_name` text null, `document_content_type` text null, `document_bytes` integer null, `created_by_id` text not null, `version` integer not null default 1, `created_at` datetime not null, `updated_at` datetime not null, primary key (`id`))");
    this.addSql("create index `line_permissions_line_id_valid_to_index` on `line_permissions` (`line_id`, `valid_to`)");
    this.addSql("create unique index `line_permissions_line_id_reference_unique` on `line_permissions` (`line_id`, `reference`)");
  }
}
