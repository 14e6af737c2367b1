import { Migration } from '@mikro-orm/migrations';

/** The PostGIS step of PostgreSQL (geometry columns and indexes); SQLite keeps the spatial queries in JavaScript. */
export class Migration20261203172000 extends Migration {
  override async up(): Promise<void> {
    // Nothing to change on SQLite: kept so both dialects list the same migrations.
  }
}
