import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { useMe } from '../auth/queries.ts';
import type { AuditFilters } from './api.ts';
import { auditQueries } from './queries.ts';
import { ChangeList } from '../../components/change-list.tsx';
import { dateTime } from '../../lib/format.ts';
import { actionLabel, describeChanges, recordTypeLabel, type NameOf } from '../../lib/history.ts';

const FIELDS = ['userId', 'recordType', 'recordId', 'action', 'from', 'to'] as const;

/** The audit log with its filters kept in the address, so a filtered view can be shared. */
export function AuditLogPage() {
  const me = useMe();
  const [params, setParams] = useSearchParams();
  const filters: AuditFilters = { page: Number(params.get('page') ?? 1) || 1 };
  for (const f of FIELDS) if (params.get(f)) filters[f] = params.get(f)!;
  const list = useQuery(auditQueries.list(filters));
  const facets = useQuery(auditQueries.facets());
  const setMany = (values: Record<string, string>) => {
    const next = new URLSearchParams(params);
    for (const [key, value] of Object.entries(values)) {
      if (value) next.set(key, value);
      else next.delete(key);
    }
    if (!('page' in values)) next.delete('page');
    setParams(next, { replace: true });
  };
  const set = (key: string, value: string) => setMany({ [key]: value });
  const onlySpans = !me.roles.includes('admin');
  const data = list.data;
  const nameOf: NameOf = (field, id) => (['surveyorId', 'actorId', 'userId'].includes(field) ? facets.data?.users.find((u) => u.id === id)?.name : undefined);
  return (
    <section aria-labelledby="audit-title" className="space-y-4">
      <header>
        <h1 id="audit-title" className="page-title">Audit log</h1>
        <p className="text-ink-700">Who changed what, when, before → after.{onlySpans && ' Your role sees the span-related part: spans, hazards, photos, zones.'}</p>
      </header>
      <form role="search" aria-label="Filter the audit log" className="card grid gap-3 sm:grid-cols-3 lg:grid-cols-6" onSubmit={(e) => e.preventDefault()}>
        <div>
          <label htmlFor="audit-user" className="field-label">Who</label>
          <select id="audit-user" className="field-input" value={filters.userId ?? ''} onChange={(e) => set('userId', e.target.value)}>
            <option value="">Anyone</option>
            {facets.data?.users.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="audit-type" className="field-label">Record type</label>
          <select id="audit-type" className="field-input" value={filters.recordType ?? ''} onChange={(e) => set('recordType', e.target.value)}>
            <option value="">Any</option>
            {facets.data?.recordTypes.map((t) => <option key={t} value={t}>{recordTypeLabel(t)}</option>)}
          </select>
        </div>
        <div>
          <span className="field-label">Record</span>
          {filters.recordId ? (
            <p className="flex items-center gap-2 pt-2 text-sm">
              <span>One {filters.recordType ? recordTypeLabel(filters.recordType).toLowerCase() : 'record'}</span>
              <button type="button" className="underline" onClick={() => setMany({ recordId: '' })}>Show all</button>
            </p>
          ) : (
            <p className="pt-2 text-sm text-ink-700">Any (pick one from an entry)</p>
          )}
        </div>
        <div>
          <label htmlFor="audit-action" className="field-label">Action</label>
          <select id="audit-action" className="field-input" value={filters.action ?? ''} onChange={(e) => set('action', e.target.value)}>
            <option value="">Any</option>
            {facets.data?.actions.map((a) => <option key={a} value={a}>{actionLabel(a)}</option>)}
          </select>
        </div>
        <div>
          <label htmlFor="audit-from" className="field-label">From</label>
          <input id="audit-from" type="date" className="field-input" value={filters.from ?? ''} onChange={(e) => set('from', e.target.value)} />
        </div>
        <div>
          <label htmlFor="audit-to" className="field-label">To</label>
          <input id="audit-to" type="date" className="field-input" value={filters.to ?? ''} onChange={(e) => set('to', e.target.value)} />
        </div>
      </form>
      {list.error && <p role="alert" className="field-error">{list.error.message}</p>}
      {data && (
        <>
          <p className="text-sm text-ink-700">{data.total === 0 ? 'No entries match.' : `${data.total} entries`}</p>
          <ol className="space-y-2" aria-label="Audit entries">
            {data.items.map((e) => (
              <li key={e.id} className="card">
                <div className="mb-2 flex flex-wrap items-baseline gap-x-3 gap-y-1">
                  <span className="font-semibold">{e.actorName ?? (e.actorId ? 'Unknown user' : 'The system')}</span>
                  <span>{actionLabel(e.action)}</span>
                  <button type="button" className="text-sm text-ink-700 underline" onClick={() => setMany({ recordType: e.recordType, recordId: e.recordId })}>
                    {recordTypeLabel(e.recordType)}: every entry of this record
                  </button>
                  {e.recordType === 'span' && <Link to={`/spans/${e.recordId}`} className="text-sm font-semibold underline">Open span</Link>}
                  <time className="ml-auto text-sm text-ink-500" dateTime={e.at}>{dateTime(e.at)}</time>
                </div>
                <ChangeList changes={describeChanges(e.before, e.after, { system: me.unitSystem, nameOf })} />
              </li>
            ))}
          </ol>
          {data.total > data.pageSize && (
            <div className="flex gap-2">
              <button type="button" className="btn-ghost" disabled={data.page <= 1} onClick={() => set('page', String(data.page - 1))}>Newer</button>
              <button type="button" className="btn-ghost" disabled={data.page * data.pageSize >= data.total} onClick={() => set('page', String(data.page + 1))}>Older</button>
            </div>
          )}
        </>
      )}
    </section>
  );
}
