// Runs every bench/*.bench.ts in turn (or those whose name contains an argument) and prints each one's table.
// A bench module exports `run(): Promise<BenchRow[] | void>`; rows are printed with console.table.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export type BenchRow = Record<string, string | number>;

const dir = path.dirname(fileURLToPath(import.meta.url));
const args = process.argv.slice(2).filter((a) => a !== '--load');
// `--spans N` runs the scale bench at N spans (and the sizes below it).
const spansAt = args.indexOf('--spans');
if (spansAt >= 0) {
  process.env.BENCH_SCALE_SPANS = args[spansAt + 1];
  args.splice(spansAt, 2, 'scale');
}
const filters = args;

// `npm run bench -- --load`: the 50-client load run alone (bench/load.ts; it is not part of the default run).
if (process.argv.includes('--load')) {
  const mod = (await import(pathToFileURL(path.join(dir, 'load.ts')).href)) as { run: () => Promise<BenchRow[]> };
  console.log('\n▶ load');
  const rows = await mod.run();
  if (rows.length) console.table(rows);
  process.exit(0);
}
const files = fs
  .readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => (filters.length === 0 ? !['scale.bench.ts', 'missions.bench.ts', 'dialects.bench.ts'].includes(f) : filters.some((q) => f.includes(q))))
  .sort();

if (files.length === 0) {
  console.log(filters.length ? `No bench matches ${filters.join(', ')}.` : 'No bench/*.bench.ts files.');
  process.exit(0);
}

let failed = 0;
for (const file of files) {
  const name = file.replace(/\.bench\.ts$/, '');
  console.log(`\n▶ ${name}`);
  const started = performance.now();
  try {
    const mod = (await import(pathToFileURL(path.join(dir, file)).href)) as { run?: () => Promise<BenchRow[] | void> | BenchRow[] | void };
    if (typeof mod.run !== 'function') throw new Error(`${file} exports no run()`);
    const rows = await mod.run();
    if (rows && rows.length) console.table(rows);
    console.log(`  ${name} took ${((performance.now() - started) / 1000).toFixed(1)} s`);
  } catch (err) {
    failed++;
    console.error(`  ${name} failed:`, err);
  }
}
process.exit(failed ? 1 : 0);
