import { useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { LOAD_SERIES_PROBLEM_LABELS, LOAD_SERIES_WARNING_KINDS, type LoadSeriesProblem, type LoadSeriesReport } from '#shared/schemas/load-evidence.ts';
import { ProgressBar } from '../../../components/progress-bar.tsx';
import { ApiError } from '../../../lib/api.ts';
import { evidenceApi } from '../api.ts';
import { count, interval, writtenTime } from '../format.ts';

type Phase = { kind: 'idle' } | { kind: 'sending'; mode: 'dry-run' | 'commit'; fraction: number | null } | { kind: 'report'; report: LoadSeriesReport } | { kind: 'refused'; problems: LoadSeriesProblem[]; message: string };

const isWarning = (p: LoadSeriesProblem) => (LOAD_SERIES_WARNING_KINDS as readonly string[]).includes(p.kind);

/** Upload a metered series: check it first (every problem by row), then import it; a file with errors is never stored. */
export function SeriesImportCard({ lineId }: { lineId: string }) {
  const qc = useQueryClient();
  const [file, setFile] = useState<File | null>(null);
  const [timeZone, setTimeZone] = useState('');
  const [phase, setPhase] = useState<Phase>({ kind: 'idle' });
  const [error, setError] = useState<string | null>(null);

  const send = async (mode: 'dry-run' | 'commit') => {
    if (!file) return;
    setError(null);
    setPhase({ kind: 'sending', mode, fraction: 0 });
    try {
      const report = await evidenceApi.importSeries(lineId, file, mode, timeZone.trim() || undefined, (p) => setPhase({ kind: 'sending', mode, fraction: p.fraction }));
      setPhase({ kind: 'report', report });
      if (report.committed) await qc.invalidateQueries({ queryKey: ['evidence'] });
    } catch (e) {
      const body = e instanceof ApiError ? (e.body as { problems?: LoadSeriesProblem[] } | undefined) : undefined;
      if (body?.problems) setPhase({ kind: 'refused', problems: body.problems, message: (e as Error).message });
      else {
        setPhase({ kind: 'idle' });
        setError((e as Error).message);
      }
    }
  };

  const report = phase.kind === 'report' ? phase.report : null;
  const problems = phase.kind === 'report' ? phase.report.problems : phase.kind === 'refused' ? phase.problems : [];
  const errors = problems.filter((p) => !isWarning(p));
  return (
    <section className="card space-y-3" aria-labelledby="series-import">
      <h2 id="series-import" className="text-lg font-bold">Import metered currents</h2>
      <p className="text-sm text-ink-700">
        A CSV with the columns <code>timestamp</code> (ISO 8601 with its UTC offset, or local time with the file's time zone below) and <code>current_a</code>, at any interval.
        Check the file first; importing replaces the readings of the days it covers.
      </p>
      <div className="flex flex-wrap items-end gap-3">
        <label className="block">
          <span className="field-label">Series file</span>
          <input type="file" accept=".csv,text/csv" className="field-input" onChange={(e) => { setFile(e.target.files?.[0] ?? null); setPhase({ kind: 'idle' }); }} />
        </label>
        <label className="block">
          <span className="field-label">Time zone of local times (optional)</span>
          <input className="field-input w-56" placeholder="e.g. Pacific/Auckland" value={timeZone} onChange={(e) => setTimeZone(e.target.value)} />
        </label>
        <button type="button" className="btn-ghost" disabled={!file || phase.kind === 'sending'} onClick={() => send('dry-run')}>Check file</button>
        <button type="button" className="btn-primary" disabled={!file || phase.kind === 'sending' || !report || errors.length > 0 || report.committed} onClick={() => send('commit')}>Import readings</button>
      </div>
      {phase.kind === 'sending' && <ProgressBar label={phase.mode === 'commit' ? 'Importing the readings' : 'Checking the file'} value={phase.fraction} />}
      {error && <p role="alert" className="field-error">{error}</p>}
      {report && (
        <p role="status" className={report.committed ? 'font-semibold text-go' : ''}>
          {report.committed ? 'Imported: ' : 'Checked: '}
          {count(report.accepted)} of {count(report.rows)} rows usable, {count(report.days)} days
          {report.firstAt && report.lastAt ? `, ${writtenTime(report.firstAt)} to ${writtenTime(report.lastAt)}` : ''}, a reading every {interval(report.intervalS)}.
          {errors.length > 0 && ' Fix the rows below, then check again: a file with errors is not imported.'}
        </p>
      )}
      {phase.kind === 'refused' && <p role="alert" className="field-error">{phase.message}</p>}
      {problems.length > 0 && (
        <div className="max-h-72 overflow-auto">
          <table className="w-full text-sm">
            <thead>
              <tr className="text-left text-ink-700"><th className="py-1">Row</th><th>Problem</th><th>Detail</th></tr>
            </thead>
            <tbody>
              {problems.map((p) => (
                <tr key={`${p.row}-${p.kind}`} className="border-t border-ink-100">
                  <td className="py-1 pr-3 tabular-nums">{p.row}</td>
                  <td className={`pr-3 ${isWarning(p) ? 'text-brass-700' : 'text-alarm'}`}>{LOAD_SERIES_PROBLEM_LABELS[p.kind]}{isWarning(p) ? ' (note)' : ''}</td>
                  <td>{p.message}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {report && report.moreProblems > 0 && <p className="text-sm">…and {count(report.moreProblems)} more.</p>}
        </div>
      )}
    </section>
  );
}
