// PostgreSQL migrations, handed to the migrator as classes like the SQLite ones. The first one creates everything
// the SQLite migrations up to the same name create; each later migration has a twin of the same name in the
// folder above (scripts/make-migration.ts writes both). tests/postgres/schema.pg.test.ts checks they stay in step.
import { Migration20261203113808 } from './Migration20261203113808.ts';
import { Migration20261203124918 } from './Migration20261203124918.ts';
import { Migration20261203125243 } from './Migration20261203125243.ts';
import { Migration20261203131056 } from './Migration20261203131056.ts';
import { Migration20261203142915 } from './Migration20261203142915.ts';
import { Migration20261203170800 } from './Migration20261203170800.ts';
import { Migration20261203172000 } from './Migration20261203172000.ts';
import { Migration20261203173214 } from './Migration20261203173214.ts';
import { Migration20261203180000 } from './Migration20261203180000.ts';

export const postgresMigrationsList: { name: string; class: any }[] = [
  { name: 'Migration20261203113808', class: Migration20261203113808 },
  { name: 'Migration20261203124918', class: Migration20261203124918 },
  { name: 'Migration20261203125243', class: Migration20261203125243 },
  { name: 'Migration20261203131056', class: Migration20261203131056 },
  { name: 'Migration20261203142915', class: Migration20261203142915 },
  { name: 'Migration20261203170800', class: Migration20261203170800 },
  { name: 'Migration20261203172000', class: Migration20261203172000 },
  { name: 'Migration20261203173214', class: Migration20261203173214 },
  { name: 'Migration20261203180000', class: Migration20261203180000 },
];
