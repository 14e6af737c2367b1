// Import a line inventory (CSV or GeoJSON): dry run with a row-by-row report, then an all-or-nothing commit.
import { useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { INVENTORY_CSV_COLUMNS, type ImportAction, type ImportFormat, type ImportReport } from '#shared/schemas/inventory.ts';
import { ApiError } from '../../../lib/api.ts';
import { formatOfFile, runImport, type ImportJobProgress } from '../api.ts';
import type { UploadProgress } from '../upload.ts';
import { ProgressBar } from './progress-bar.tsx';
import { count } from '../../../lib/format.ts';

const ACTION_LOOK: Record<ImportAction, { label: string; className: string }> = {
  create: { label: 'Create', className: 'bg-green-50 text-go border-green-300' },
  update: { label: 'Update', className: 'bg-brass-100 text-brass-700 border-brass-300' },
  unchanged: { label: 'Unchanged', className: 'bg-ink-50 text-ink-700 border-ink-200' },
  refuse: { label: 'Refused', className: 'bg-red-50 text-alarm border-red-300' },
};

type Phase = 'idle' | 'checking' | 'checked' | 'committing' | 'committed';

/**
 * The import job's progress in rows: a dry run counts rows checked; a commit counts rows checked and then rows
 * saved (its total is twice the rows), shown as two steps of one bar each.
 */
function RowsProgress({ committing, progress }: { committing: boolean; progress: ImportJobProgress | null }) {
  if (!progress || progress.total === 0) return <ProgressBar label="Reading the file" value={null} detail="counting rows" />;
  const rows = committing ? progress.total / 2 : progress.total;
  const checked = Math.min(rows, progress.done);
  const saved = committing ? Math.max(0, progress.done - rows) : 0;
  return (
    <>
      <ProgressBar label="Checking rows" value={rows ? checked / rows : 1} detail={`${count(checked)} of ${count(rows)} rows`} />
      {committing && checked >= rows && <ProgressBar label="Saving rows" value={rows ? saved / rows : 1} detail={`${count(saved)} of ${count(rows)} rows`} />}
    </>
  );
}

export function ImportPage() {
  const queryClient = useQueryClient();
  const [file, setFile] = useState<File | null>(null);
  const [format, setFormat] = useState<ImportFormat>('csv');
  const [phase, setPhase] = useState<Phase>('idle');
  const [upload, setUpload] = useState<UploadProgress | null>(null);
  // True once the file is up and the server's import job is working through the rows.
  const [processing, setProcessing] = useState(false);
  const [progress, setProgress] = useState<ImportJobProgress | null>(null);
  const [report, setReport] = useState<ImportReport | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [show, setShow] = useState<ImportAction | 'all'>('all');
  const abort = useRef<AbortController | null>(null);

  const run = async (step: 'dry-run' | 'commit') => {
    if (!file) return;
    setError(null);
    setUpload({ loaded: 0, total: file.size, fraction: 0 });
    setProcessing(false);
    setProgress(null);
    setPhase(step === 'dry-run' ? 'checking' : 'committing');
    abort.current = new AbortController();
    try {
      const r = await runImport(
        step,
        file,
        format,
        (p) => {
          setUpload(p);
          if (p.fraction === 1) setProcessing(true);
        },
        (p) => {
          setProcessing(true);
          setProgress(p);
        },
        abort.current.signal,
      );
      setReport(r);
      setShow(r.summary.refuse ? 'refuse' : 'all');
      setPhase(step === 'dry-run' ? 'checked' : 'committed');
      if (step === 'commit') await queryClient.invalidateQueries();
    } catch (err) {
      setPhase(step === 'commit' ? 'checked' : 'idle');
      const body = err instanceof ApiError ? (err.body as { error?: { report?: ImportReport } } | undefined) : undefined;
      if (body?.error?.report) setReport(body.error.report);
      setError(err instanceof ApiError && err.issues.length ? `${err.message}: ${err.issues.map((i) => `${i.path} — ${i.message}`).join('; ')}` : err instanceof Error ? err.message : 'The import failed; nothing was changed.');
    } finally {
      setUpload(null);
      setProcessing(false);
      setProgress(null);
      abort.current = null;
    }
  };

  const busy = phase === 'checking' || phase === 'committing';
  const rows = report?.rows.filter((r) => show === 'all' || r.action === show) ?? [];
  const changes = report ? report.summary.create + report.summary.update : 0;

  return (
    <div className="mx-auto max-w-5xl space-y-4">
      <header>
        <h1 className="page-title">Import a line inventory</h1>
        <p className="text-ink-700">
          A CSV or GeoJSON file of lines, structures and spans. First a dry run shows, row by row, what would be created, updated or refused; nothing is saved until
          you commit, and a commit saves every row or none.
        </p>
      </header>

      <section className="card space-y-4" aria-labelledby="imp-file">
        <h2 id="imp-file" className="text-lg font-bold">1. Choose the file</h2>
        <div>
          <label className="field-label" htmlFor="import-file">File (.csv, .geojson)</label>
          <input
            id="import-file"
            type="file"
            accept=".csv,.geojson,.json,text/csv,application/geo+json,application/json"
            className="field-input"
            disabled={busy}
            onChange={(e) => {
              const f = e.target.files?.[0] ?? null;
              setFile(f);
              setReport(null);
              setError(null);
              setPhase('idle');
              const detected = f ? formatOfFile(f.name) : null;
              if (detected) setFormat(detected);
            }}
          />
        </div>
        <fieldset>
          <legend className="field-label">Format</legend>
          <div className="flex gap-2">
            {(['csv', 'geojson'] as const).map((f) => (
              <label key={f} className="touch-choice has-[:checked]:border-ink-900 has-[:checked]:bg-ink-900 has-[:checked]:text-chalk">
                <input type="radio" name="format" value={f} checked={format === f} onChange={() => setFormat(f)} className="sr-only" disabled={busy} />
                {f === 'csv' ? 'CSV' : 'GeoJSON'}
              </label>
            ))}
          </div>
        </fieldset>
        <details className="text-sm text-ink-700">
          <summary className="cursor-pointer font-semibold">CSV columns (one span a row, SI units)</summary>
          <p className="mt-2 break-words font-mono text-xs">{INVENTORY_CSV_COLUMNS.join(', ')}</p>
          <p className="mt-1">GeoJSON: one LineString feature a span (from and to structure as its two positions), the same names as properties. A file exported from the Spans table imports back as is.</p>
        </details>
        <div className="flex flex-wrap gap-3">
          <button type="button" className="btn-primary" disabled={!file || busy} onClick={() => void run('dry-run')}>
            Check the file (dry run)
          </button>
          {busy && (
            <button type="button" className="btn-ghost" onClick={() => abort.current?.abort()}>
              Cancel
            </button>
          )}
        </div>
        {busy && (
          <div className="space-y-3" aria-live="polite">
            <ProgressBar
              label="Upload"
              value={upload?.fraction ?? (processing ? 1 : null)}
              detail={upload ? `${count(upload.loaded / 1024)} of ${count((upload.total || file?.size || 0) / 1024)} KiB` : undefined}
            />
            {processing && <RowsProgress committing={phase === 'committing'} progress={progress} />}
          </div>
        )}
        {error && (
          <p className="field-error" role="alert">
            {error}
          </p>
        )}
      </section>

      {report && (
        <section className="card space-y-4" aria-labelledby="imp-report">
          <h2 id="imp-report" className="text-lg font-bold">
            {report.committed ? '3. Imported' : '2. What the import would do'}
          </h2>
          {report.committed && (
            <p role="status" className="rounded-lg bg-green-50 p-3 font-semibold text-go">
              Saved: {count(report.summary.create)} created, {count(report.summary.update)} updated, {count(report.summary.unchanged)} unchanged.
            </p>
          )}
          <div className="flex flex-wrap gap-2" role="group" aria-label="Show rows">
            {(['all', 'create', 'update', 'unchanged', 'refuse'] as const).map((a) => (
              <button key={a} type="button" aria-pressed={show === a} className={`btn-ghost ${show === a ? 'border-ink-900 bg-ink-50' : ''}`} onClick={() => setShow(a)}>
                {a === 'all' ? `All ${report.rows.length}` : `${ACTION_LOOK[a].label} ${report.summary[a]}`}
              </button>
            ))}
          </div>
          <div className="max-h-[60vh] overflow-auto">
            <table className="w-full text-left text-sm" aria-label="Import report">
              <thead className="sticky top-0 bg-white">
                <tr className="border-b border-ink-200">
                  <th className="py-2 pr-3">Row</th>
                  <th className="py-2 pr-3">Action</th>
                  <th className="py-2 pr-3">What</th>
                  <th className="py-2">Reasons</th>
                </tr>
              </thead>
              <tbody>
                {rows.map((r) => (
                  <tr key={r.row} className="border-b border-ink-100 align-top" data-action={r.action}>
                    <td className="py-2 pr-3 tabular-nums">{r.row}</td>
                    <td className="py-2 pr-3">
                      <span className={`rounded-full border px-2 py-0.5 text-xs font-semibold ${ACTION_LOOK[r.action].className}`}>{ACTION_LOOK[r.action].label}</span>
                    </td>
                    <td className="py-2 pr-3">{r.subject}</td>
                    <td className="py-2">{r.reasons.length ? <ul className="list-disc pl-4">{r.reasons.map((x, i) => <li key={i}>{x}</li>)}</ul> : '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {!report.committed && (
            <div className="space-y-2">
              {report.summary.refuse > 0 ? (
                <p className="font-semibold text-alarm">
                  {report.summary.refuse} row{report.summary.refuse === 1 ? ' is' : 's are'} refused. The import saves all rows or none: fix the file and check it again.
                </p>
              ) : changes === 0 ? (
                <p className="font-semibold">Nothing would change: the inventory already matches this file.</p>
              ) : null}
              <button type="button" className="btn-accent" disabled={busy || report.summary.refuse > 0 || changes === 0} onClick={() => void run('commit')}>
                Commit {changes} change{changes === 1 ? '' : 's'}
              </button>
            </div>
          )}
        </section>
      )}
    </div>
  );
}
