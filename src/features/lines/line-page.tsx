// A line's page: its figures and the owner's permissions to perch and harvest (admin and safety add them).
import { useState } from 'react';
import { Link, useParams } from 'react-router';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { formatQuantity } from '#shared/units.ts';
import { ApiError } from '../../lib/api.ts';
import { date } from '../../lib/format.ts';
import { useMe } from '../auth/queries.ts';
import { isExpired, isNotYetValid, lineApi, lineQueries, type LinePermissionInput } from './api.ts';

const DATE = /^\d{4}-\d{2}-\d{2}$/;

function PermissionForm({ lineId }: { lineId: string }) {
  const qc = useQueryClient();
  const [v, setV] = useState<LinePermissionInput>({ reference: '', validFrom: '', validTo: '', conditions: '' });
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [touched, setTouched] = useState(false);
  const issues: Partial<Record<keyof LinePermissionInput, string>> = {};
  if (!v.reference.trim()) issues.reference = 'Enter the owner’s reference';
  if (!DATE.test(v.validFrom)) issues.validFrom = 'Enter the first valid day';
  if (!DATE.test(v.validTo)) issues.validTo = 'Enter the last valid day';
  else if (DATE.test(v.validFrom) && v.validTo < v.validFrom) issues.validTo = 'The last valid day must not be before the first';
  const save = useMutation({
    mutationFn: async () => {
      const created = await lineApi.addPermission(lineId, { ...v, reference: v.reference.trim(), conditions: v.conditions.trim() });
      if (file) {
        setProgress(0);
        await lineApi.uploadDocument(lineId, created.id, file, (p) => setProgress(p.fraction));
      }
      return created;
    },
    onSuccess: () => {
      setV({ reference: '', validFrom: '', validTo: '', conditions: '' });
      setFile(null);
      setTouched(false);
      setProgress(null);
      void qc.invalidateQueries({ queryKey: ['lines', lineId, 'permissions'] });
    },
    onError: () => {
      setProgress(null);
      void qc.invalidateQueries({ queryKey: ['lines', lineId, 'permissions'] });
    },
  });
  const serverIssue = (k: string) => (save.error instanceof ApiError ? save.error.issueFor(k) : undefined);
  const show = (k: keyof LinePermissionInput) => serverIssue(k) ?? (touched ? issues[k] : undefined);
  const set = (k: keyof LinePermissionInput) => (e: { target: { value: string } }) => setV((o) => ({ ...o, [k]: e.target.value }));
  return (
    <form
      className="space-y-3 rounded-lg border border-ink-200 p-3"
      aria-label="Add a permission"
      onSubmit={(e) => {
        e.preventDefault();
        setTouched(true);
        if (Object.keys(issues).length === 0) save.mutate();
      }}
    >
      <h3 className="font-bold">Add a permission</h3>
      <div className="grid gap-3 sm:grid-cols-3">
        <div>
          <label className="field-label" htmlFor="perm-reference">Owner’s reference</label>
          <input id="perm-reference" className="field-input" value={v.reference} onChange={set('reference')} />
          {show('reference') && <p className="field-error">{show('reference')}</p>}
        </div>
        <div>
          <label className="field-label" htmlFor="perm-from">Valid from</label>
          <input id="perm-from" type="date" className="field-input" value={v.validFrom} onChange={set('validFrom')} />
          {show('validFrom') && <p className="field-error">{show('validFrom')}</p>}
        </div>
        <div>
          <label className="field-label" htmlFor="perm-to">Valid to</label>
          <input id="perm-to" type="date" className="field-input" value={v.validTo} onChange={set('validTo')} />
          {show('validTo') && <p className="field-error">{show('validTo')}</p>}
        </div>
      </div>
      <div>
        <label className="field-label" htmlFor="perm-conditions">Conditions</label>
        <textarea id="perm-conditions" className="field-input min-h-20" value={v.conditions} onChange={set('conditions')} />
      </div>
      <div>
        <label className="field-label" htmlFor="perm-document">Document (PDF or image) — optional</label>
        <input id="perm-document" type="file" accept="application/pdf,image/jpeg,image/png,image/webp" className="field-input" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
      </div>
      {progress !== null && <progress className="w-full" max={1} value={progress ?? undefined} aria-label="Document upload" />}
      {save.error && <p className="field-error" role="alert">{save.error instanceof ApiError ? save.error.message : 'The server could not be reached'}</p>}
      <button type="submit" className="btn-primary" disabled={save.isPending}>{save.isPending ? 'Saving…' : 'Add permission'}</button>
    </form>
  );
}

export function LinePage() {
  const { id = '' } = useParams();
  const me = useMe();
  const line = useQuery(lineQueries.line(id));
  const perms = useQuery(lineQueries.permissions(id));
  const mayAdd = me.roles.includes('admin') || me.roles.includes('safety');
  if (line.isPending) return <p className="p-8 text-center text-ink-700">Loading the line…</p>;
  if (line.error) throw line.error;
  const l = line.data;
  const fact = (k: string, v: string) => (
    <div><dt className="text-sm text-ink-700">{k}</dt><dd className="font-semibold">{v}</dd></div>
  );
  return (
    <article className="space-y-4" aria-labelledby="line-title">
      <Link to="/lines" className="text-sm font-semibold text-ink-700 underline">← Lines</Link>
      <h1 id="line-title" className="page-title">{l.name}</h1>
      <dl className="card grid grid-cols-2 gap-3 sm:grid-cols-4">
        {fact('Owner', l.owner || '—')}
        {fact('Voltage', formatQuantity(l.voltageKv, 'voltage', me.unitSystem))}
        {fact('Frequency', `${l.frequencyHz} Hz`)}
        {fact('Typical load', formatQuantity(l.loadTypicalA, 'current', me.unitSystem))}
      </dl>
      <div className="flex flex-wrap gap-2">
        <Link className="btn-ghost" to={`/spans?lineId=${encodeURIComponent(l.id)}`}>Spans of this line</Link>
        <Link className="btn-ghost" to={`/map?lineId=${encodeURIComponent(l.id)}`}>On the map</Link>
      </div>
      <section className="card space-y-3" aria-labelledby="perms-title">
        <h2 id="perms-title" className="text-lg font-bold">Owner’s permissions to perch and harvest</h2>
        {perms.isPending && <p>Loading…</p>}
        {perms.error && <p className="field-error">{perms.error.message}</p>}
        {perms.data && perms.data.length === 0 && <p className="text-ink-700">No permission on record: a mission perching on this line cannot be authorised.</p>}
        <ul className="space-y-2" data-testid="permissions">
          {(perms.data ?? []).map((p) => {
            const expired = isExpired(p);
            return (
              <li key={p.id} className={`rounded-lg border p-3 ${expired ? 'border-alarm/40 bg-red-50' : 'border-ink-100'}`}>
                <div className="flex flex-wrap items-center gap-2">
                  <strong>{p.reference}</strong>
                  {expired && <span className="rounded-full bg-alarm px-2 text-sm font-bold text-white">Expired</span>}
                  {!expired && isNotYetValid(p) && <span className="rounded-full bg-brass-300 px-2 text-sm font-bold">Not yet valid</span>}
                  <span className="text-sm text-ink-700">valid {date(p.validFrom)} to {date(p.validTo)}</span>
                  {p.documentUrl && <a className="ml-auto underline" href={p.documentUrl} target="_blank" rel="noreferrer">{p.documentName ?? 'Document'}</a>}
                  {p.createdByName && <span className="w-full text-xs text-ink-700">Entered by {p.createdByName}</span>}
                </div>
                {p.conditions && <p className="mt-1 whitespace-pre-line text-sm">Conditions: {p.conditions}</p>}
              </li>
            );
          })}
        </ul>
        {mayAdd && <PermissionForm lineId={l.id} />}
      </section>
    </article>
  );
}

export function LinesPage() {
  const me = useMe();
  const lines = useQuery(lineQueries.lines());
  return (
    <div className="space-y-3">
      <h1 className="page-title">Lines</h1>
      {lines.isPending && <p>Loading…</p>}
      <ul className="grid gap-2 sm:grid-cols-2">
        {(lines.data ?? []).map((l) => (
          <li key={l.id} className="card p-3">
            <Link className="text-lg font-semibold underline" to={`/lines/${l.id}`}>{l.name}</Link>
            <p className="text-sm text-ink-700">{l.owner} · {formatQuantity(l.voltageKv, 'voltage', me.unitSystem)}{l.spanCount !== undefined ? ` · ${l.spanCount} spans` : ''}</p>
          </li>
        ))}
      </ul>
    </div>
  );
}
