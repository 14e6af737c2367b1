// Migrations are handed to the migrator as classes, so they run the same under tsx, vitest and node.
// Add each new migration here (scripts/make-migration.ts does it for you).
import { Migration20261202031719 } from './Migration20261202031719.ts';
import { Migration20261202032845 } from './Migration20261202032845.ts';
import { Migration20261202032920 } from './Migration20261202032920.ts';
import { Migration20261202032922 } from './Migration20261202032922.ts';
import { Migration20261202032934 } from './Migration20261202032934.ts';
import { Migration20261202033100 } from './Migration20261202033100.ts';
import { Migration20261202034000 } from './Migration20261202034000.ts';
import { Migration20261202052703 } from './Migration20261202052703.ts';
import { Migration20261203094922 } from './Migration20261203094922.ts';
import { Migration20261203102803 } from './Migration20261203102803.ts';
import { Migration20261203113007 } from './Migration20261203113007.ts';
import { Migration20261203113032 } from './Migration20261203113032.ts';
import { Migration20261203113759 } from './Migration20261203113759.ts';
import { Migration20261203113808 } from './Migration20261203113808.ts';
import { Migration20261203124918 } from './Migration20261203124918.ts';
import { Migration20261203125243 } from './Migration20261203125243.ts';
import { Migration20261203131056 } from './Migration20261203131056.ts';
import { Migration20261203142915 } from './Migration20261203142915.ts';
import { Migration20261203170800 } from './Migration20261203170800.ts';
import { Migration20261203172000 } from './Migration20261203172000.ts';
import { Migration20261203173214 } from './Migration20261203173214.ts';
import { Migration20261203180000 } from './Migration20261203180000.ts';

export const migrationsList: { name: string; class: any }[] = [
  { name: 'Migration20261202031719', class: Migration20261202031719 },
  { name: 'Migration20261202032845', class: Migration20261202032845 },
  { name: 'Migration20261202032920', class: Migration20261202032920 },
  { name: 'Migration20261202032922', class: Migration20261202032922 },
  { name: 'Migration20261202032934', class: Migration20261202032934 },
  { name: 'Migration20261202033100', class: Migration20261202033100 },
  { name: 'Migration20261202034000', class: Migration20261202034000 },
  { name: 'Migration20261202052703', class: Migration20261202052703 },
  { name: 'Migration20261203094922', class: Migration20261203094922 },
  { name: 'Migration20261203102803', class: Migration20261203102803 },
  { name: 'Migration20261203113007', class: Migration20261203113007 },
  { name: 'Migration20261203113032', class: Migration20261203113032 },
  { name: 'Migration20261203113759', class: Migration20261203113759 },
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
