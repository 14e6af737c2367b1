// The import as a durable job: the upload is kept on disk, a job reads it as a stream (dry run or commit), its
// progress counts rows (a commit: rows checked, then rows written), and its result is the row report.
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import type { ImportFormat, ImportReport } from '#shared/schemas/inventory.ts';
import type { AppContext } from '../../context.ts';
import { User } from '../auth/user.entity.ts';
import { notifySpanChanged } from '../inventory/inventory.service.ts';
import { jobRunnerFor } from '../jobs/job-runner.ts';
import { commitImport, dryRun, ImportRefusedError } from './import.service.ts';
import { applyPlanInParts, countCsvRows, planCsvStream } from './import-stream.ts';

export type ImportMode = 'dry-run' | 'commit';

export interface ImportJobPayload {
  file: string;
  format: ImportFormat;
  mode: ImportMode;
  userId: string;
  filename: string | null;
}

/** Where uploads wait for their import job (inside the uploads folder, so every process on the machine sees them). */
export const importFilesDir = (ctx: AppContext) => path.join(ctx.config.uploadsDir, 'imports');

export function newImportFile(ctx: AppContext): string {
  const dir = importFilesDir(ctx);
  fs.mkdirSync(dir, { recursive: true });
  return path.join(dir, `${randomUUID()}.upload`);
}

export function queueImport(ctx: AppContext, payload: ImportJobPayload) {
  const what = payload.mode === 'commit' ? 'import' : 'dry run';
  return jobRunnerFor(ctx).enqueue({ kind: `import-${payload.mode}`, reason: `${what} of ${payload.filename ?? 'an inventory file'}`, payload });
}

/** Thrown with the refused report, which the job keeps as its result. */
class RefusedWithReport extends ImportRefusedError {
  readonly jobResult: ImportReport;
  constructor(report: ImportReport) {
    super(report);
    this.jobResult = report;
  }
}

export function registerImportWork(ctx: AppContext) {
  const queue = jobRunnerFor(ctx);
  const work = async (job: { payload: ImportJobPayload }, progress: import('../jobs/job-runner.ts').JobProgress): Promise<ImportReport | null> => {
    const p = job.payload;
    let keepFile = false;
    try {
      const em = ctx.orm.em.fork();
      const user = await em.findOne(User, { id: p.userId });
      if (!user) throw new Error('The account that started this import no longer exists');
      if (p.format === 'geojson') {
        // GeoJSON is one document: read whole (its features reference each other), as the direct endpoints do.
        progress.setTotal(1);
        const text = await fs.promises.readFile(p.file, 'utf8');
        const report = p.mode === 'commit' ? await commitImport(em, user, 'geojson', text).catch((err) => { throw err instanceof ImportRefusedError ? new RefusedWithReport(err.report) : err; }) : await dryRun(em, 'geojson', text);
        progress.advance(1);
        return report;
      }
      const rows = await countCsvRows(p.file);
      const commit = p.mode === 'commit';
      progress.setTotal(commit ? rows * 2 : rows);
      const { plan, report } = await planCsvStream(em, fs.createReadStream(p.file), { onRows: (n) => progress.advance(n) });
      if (progress.aborted) {
        keepFile = true;
        return null;
      }
      if (!commit) return report;
      if (report.summary.refuse > 0) throw new RefusedWithReport(report);
      const records = Math.max(1, plan.lines.size + plan.structures.size + plan.spans.size);
      let written = 0;
      const res = await applyPlanInParts(em, user, plan, {
        onRecords: (n) => {
          written += n;
          progress.setDone(rows + Math.floor((rows * written) / records));
        },
        shouldStop: () => progress.aborted,
      });
      if (res.stopped) {
        // Queued again: the next run plans the file again against what is written (records match by their keys).
        keepFile = true;
        return null;
      }
      await notifySpanChanged(ctx.orm.em.fork(), { action: 'import', spanIds: res.spanIds });
      return { ...report, committed: true };
    } finally {
      if (!keepFile && !progress.aborted) await fs.promises.rm(p.file, { force: true });
    }
  };
  queue.register('import-dry-run', work);
  queue.register('import-commit', work);
}
