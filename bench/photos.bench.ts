// Photo pipeline timing: a 12-megapixel JPEG through processPhoto() (type check, EXIF, upright display + thumbnail)
// next to sharp's own resize of the same file to the display size. Run standalone: npx tsx bench/photos.bench.ts
import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import sharp from 'sharp';
import { DISPLAY_PX, processPhoto } from '../server/modules/photos/photo.pipeline.ts';

export interface BenchRow {
  label: string;
  runs: number;
  medianMs: number;
  minMs: number;
  maxMs: number;
}

export interface BenchReport {
  name: string;
  input: { width: number; height: number; megapixels: number; bytes: number };
  rows: BenchRow[];
  /** Pipeline median ÷ plain-resize median. */
  pipelineOverResize: number;
}

function summarise(label: string, ms: number[]): BenchRow {
  const sorted = [...ms].sort((a, b) => a - b);
  const round = (x: number) => Math.round(x * 10) / 10;
  return { label, runs: ms.length, medianMs: round(sorted[Math.floor(sorted.length / 2)]), minMs: round(sorted[0]), maxMs: round(sorted[sorted.length - 1]) };
}

/** Runs the cases in turn, round after round, so a busy machine slows them alike; one warm-up round first. */
async function timeInterleaved(cases: { label: string; fn: () => Promise<unknown> }[], runs: number): Promise<BenchRow[]> {
  for (const c of cases) await c.fn();
  const ms = cases.map(() => [] as number[]);
  for (let i = 0; i < runs; i++) {
    for (const [k, c] of cases.entries()) {
      const t0 = performance.now();
      await c.fn();
      ms[k].push(performance.now() - t0);
    }
  }
  return cases.map((c, k) => summarise(c.label, ms[k]));
}

export async function measure(opts: { runs?: number } = {}): Promise<BenchReport> {
  const runs = opts.runs ?? 7;
  const width = 4000;
  const height = 3000;
  // Gaussian noise is the hardest case for JPEG: every block carries detail, so the decode does full work.
  const jpeg = await sharp({ create: { width, height, channels: 3, background: '#808080', noise: { type: 'gaussian', mean: 128, sigma: 40 } } })
    .jpeg({ quality: 90 })
    .toBuffer();
  const rows = await timeInterleaved(
    [
      { label: 'Roostline pipeline: identify + EXIF + 1600 px display + 320 px thumbnail', fn: () => processPhoto(jpeg) },
      {
        label: `sharp alone: resize to ${DISPLAY_PX} px, JPEG out`,
        fn: () => sharp(jpeg).resize({ width: DISPLAY_PX, height: DISPLAY_PX, fit: 'inside' }).jpeg({ quality: 82 }).toBuffer(),
      },
      { label: 'sharp alone: resize to 320 px, JPEG out', fn: () => sharp(jpeg).resize({ width: 320, height: 320, fit: 'inside' }).jpeg().toBuffer() },
    ],
    runs,
  );
  return {
    name: 'photos',
    input: { width, height, megapixels: (width * height) / 1e6, bytes: jpeg.length },
    rows,
    pipelineOverResize: Math.round((rows[0].medianMs / rows[1].medianMs) * 100) / 100,
  };
}

/** For bench/run.ts: one flat row per case (console.table), the input described in the first column. */
export async function run(): Promise<Record<string, string | number>[]> {
  const r = await measure();
  console.log(`  pipeline ÷ sharp's own display resize (medians): ${r.pipelineOverResize}×`);
  return r.rows.map((row) => ({
    case: row.label,
    input: `${r.input.megapixels} MP JPEG, ${(r.input.bytes / 1024 / 1024).toFixed(1)} MB`,
    'median ms': row.medianMs,
    'min ms': row.minMs,
    'max ms': row.maxMs,
    runs: row.runs,
  }));
}

export function print(r: BenchReport) {
  console.log(`Photo pipeline — ${r.input.width} × ${r.input.height} (${r.input.megapixels} MP) JPEG, ${(r.input.bytes / 1024 / 1024).toFixed(1)} MB`);
  for (const row of r.rows) console.log(`  ${row.label.padEnd(76)} median ${String(row.medianMs).padStart(7)} ms  (min ${row.minMs}, max ${row.maxMs}, ${row.runs} runs)`);
  console.log(`  pipeline ÷ sharp display resize: ${r.pipelineOverResize}×`);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  measure().then(print, (err) => {
    console.error(err);
    process.exit(1);
  });
}
