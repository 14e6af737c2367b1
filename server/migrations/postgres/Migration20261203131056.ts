import { Migration } from '@mikro-orm/migrations';

export class Migration20261203131056 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create index \"spans_status_updated_at_index\" on \"spans\" (\"status\", \"updated_at\")");
    this.addSql("create index \"spans_status_created_at_index\" on \"spans\" (\"status\", \"created_at\")");
    this.addSql("create index \"spans_status_length_m_index\" on \"spans\" (\"status\", \"length_m\")");
  }
}
