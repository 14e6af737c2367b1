import { Migration } from '@mikro-orm/migrations';

export class Migration20261203124918 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table \"line_permissions\" (\"id\" varchar not null, \"line_id\" varchar not null, \"reference\" varchar not null, \"valid_from\" varchar not null, \"valid_to\" varchar not null, \"conditions\" text not null default '', \"document_key\" varchar null, \"document_name\" varchar null, \"document_content_type\" varchar null, \"document_bytes\" int null, \"created_by_id\" varchar not null, \"version\" int not null default 1, \"created_at\" timestamptz not null, \"updated_at\" timestamptz not null, constraint \"line_permissions_pkey\" primary key (\"id\"))");
    this.addSql("create index \"line_permissions_line_id_valid_to_index\" on \"line_permissions\" (\"line_id\", \"valid_to\")");
    this.addSql("alter table \"line_permissions\" add constraint \"line_permissions_line_id_reference_unique\" unique (\"line_id\", \"reference\")");
  }
}
