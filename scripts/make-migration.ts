// Writes a migration for whatever the entity schemas have that the migrations do not yet create.
// Usage: npx tsx scripts/make-migration.ts [--tables a,b]   (then review the file and commit it)
// --tables keeps only statements about those tables, so two features in progress do not share a migration.
import fs from 'node:fs';
import path from 'node:path';
import { MikroORM } from '@mikro-orm/sqlite';
import { ormOptions } from '../server/db.ts';

const orm = await MikroORM.init(ormOptions(':memory:'));
await orm.getMigrator().up();
const sql = await orm.schema.getUpdateSchemaSQL({ wrap: false, safe: false });
await orm.close();
if (!sql.trim()) {
  console.log('Schema is up to date: no migration written.');
  process.exit(0);
}
const stamp = new Date().toISOString().replace(/\D/g, '').slice(0, 14);
const name = `Migration${stamp}`;
const tablesArg = process.argv.indexOf('--tables');
const tables = tablesArg > 0 ? process.argv[tablesArg + 1].split(',') : null;
const statements = sql
  .split(/;\s*\n/)
  .map((s) => s.trim())
  .filter(Boolean)
  .filter((s) => !tables || tables.some((t) => new RegExp(`(table|on) \`${t}\``).test(s)))
  .map((s) => `    this.addSql(${JSON.stringify(s.replace(/;$/, ''))});`)
  .join('\n');
if (!statements) {
  console.log('Nothing for those tables: no migration written.');
  process.exit(0);
}
const dir = path.resolve('server/migrations');
fs.writeFileSync(
  path.join(dir, `${name}.ts`),
  `import { Migration } from '@mikro-orm/migrations';\n\nexport class ${name} extends Migration {\n  override async up(): Promise<void> {\n${statements}\n  }\n}\n`,
);
const indexPath = path.join(dir, 'index.ts');
let index = fs.readFileSync(indexPath, 'utf8');
index = index.replace(/(\n\nexport const migrationsList)/, `\nimport { ${name} } from './${name}.ts';$1`);
index = index.replace(/\n\];\s*$/, `\n  { name: '${name}', class: ${name} },\n];\n`);
fs.writeFileSync(indexPath, index);
console.log(`Wrote server/migrations/${name}.ts`);
