// Writes a migration for whatever the entity schemas have that the migrations do not yet create, for both
// dialects: server/migrations/<name>.ts (SQLite) and its twin of the same name in server/migrations/postgres/
// (computed against a throwaway PostgreSQL cluster; without the PostgreSQL binaries the twin is not written and
// the script says so). Then review both files and commit them together with the entity change.
// Usage: npx tsx scripts/make-migration.ts [--tables a,b]
// --tables keeps only statements about those tables, so two features in progress do not share a migration.
// npx tsx scripts/make-migration.ts --postgres-twin Migration20261203140000 [--tables a,b] writes only the
// PostgreSQL twin of an SQLite migration that was written without one.
import fs from 'node:fs';
import path from 'node:path';
import { MikroORM } from '@mikro-orm/sqlite';
import { MikroORM as PostgresORM } from '@mikro-orm/postgresql';
import { ormOptions, postgresOrmOptions } from '../server/db.ts';
import { postgisStatement } from '../server/sql/postgis.ts';
import { postgresBinDir, startCluster } from '../tests/postgres/cluster.ts';

const tablesArg = process.argv.indexOf('--tables');
const tables = tablesArg > 0 ? process.argv[tablesArg + 1].split(',') : null;
const twinArg = process.argv.indexOf('--postgres-twin');
const twinOf = twinArg > 0 ? process.argv[twinArg + 1] : null;
const stamp = new Date().toISOString().replace(/\D/g, '').slice(0, 14);
const name = twinOf ?? `Migration${stamp}`;

function statementsOf(sql: string, quote: string) {
  return sql
    .split(/;\s*\n/)
    .map((s) => s.trim())
    .filter((s) => s && !/^set /i.test(s))
    // PostGIS's geometry columns live only in the PostgreSQL database (server/sql/postgis.ts), never in the entities.
    .filter((s) => quote !== '"' || !postgisStatement(s))
    .filter((s) => !tables || tables.some((t) => new RegExp(`(table|on) ${quote}${t}${quote}`).test(s)))
    .map((s) => `    this.addSql(${JSON.stringify(s.replace(/;$/, ''))});`)
    .join('\n');
}

function write(dir: string, statements: string, listName: string) {
  fs.writeFileSync(
    path.join(dir, `${name}.ts`),
    `import { Migration } from '@mikro-orm/migrations';\n\nexport class ${name} extends Migration {\n  override async up(): Promise<void> {\n${statements}\n  }\n}\n`,
  );
  const indexPath = path.join(dir, 'index.ts');
  let index = fs.readFileSync(indexPath, 'utf8');
  index = index.replace(new RegExp(`(\\n\\nexport const ${listName})`), `\nimport { ${name} } from './${name}.ts';$1`);
  index = index.replace(/\n\];\s*$/, `\n  { name: '${name}', class: ${name} },\n];\n`);
  fs.writeFileSync(indexPath, index);
  console.log(`Wrote ${path.relative(process.cwd(), path.join(dir, `${name}.ts`))}`);
}

let sqliteStatements = '';
if (!twinOf) {
  const orm = await MikroORM.init(ormOptions(':memory:'));
  await orm.getMigrator().up();
  sqliteStatements = statementsOf(await orm.schema.getUpdateSchemaSQL({ wrap: false, safe: false }), '`');
  await orm.close();
}

let pgStatements = '';
const bin = postgresBinDir();
if (!bin) console.warn('PostgreSQL binaries not found (apt-get install postgresql-15, or set PG_BIN): the PostgreSQL twin is NOT written; its schema test will fail until it is.');
else {
  const cluster = await startCluster(bin);
  try {
    const pg = await PostgresORM.init(postgresOrmOptions(cluster.url));
    await pg.getMigrator().up();
    pgStatements = statementsOf(await pg.schema.getUpdateSchemaSQL({ wrap: false, safe: false }), '"');
    await pg.close();
  } finally {
    cluster.stop();
  }
}

if (!sqliteStatements && !pgStatements) {
  console.log(tables ? 'Nothing for those tables: no migration written.' : 'Schema is up to date: no migration written.');
  process.exit(0);
}
const root = path.resolve('server/migrations');
if (sqliteStatements) write(root, sqliteStatements, 'migrationsList');
if (pgStatements) write(path.join(root, 'postgres'), pgStatements, 'postgresMigrationsList');
if (bin && !twinOf && !!sqliteStatements !== !!pgStatements) console.warn('Only one dialect had changes: check the entity change against both schemas.');
