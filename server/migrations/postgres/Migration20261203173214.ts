import { Migration } from '@mikro-orm/migrations';

export class Migration20261203173214 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create index \"structures_lat_lon_id_index\" on \"structures\" (\"lat\", \"lon\", \"id\")");
  }
}
