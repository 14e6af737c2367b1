import { Migration } from '@mikro-orm/migrations';
import { installPostgis } from '../../sql/postgis.ts';

/**
 * PostGIS: `create extension if not exists postgis`, then geometry columns kept in step with the lon/lat and
 * GeoJSON columns, with GiST indexes (server/sql/postgis.ts). Stops with a message naming what to install when
 * the extension is missing, unless POSTGIS=off (then the JavaScript path is used; a later start adds the columns).
 */
export class Migration20261203172000 extends Migration {
  override async up(): Promise<void> {
    await installPostgis((text) => this.execute(text));
  }
}
