import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CrewItem } from '#shared/schemas/accounts.ts';
import { adminApi } from '../api.ts';
import { adminQueries, auditQueries } from '../queries.ts';

export function CrewsPanel() {
  const queryClient = useQueryClient();
  const { data } = useQuery(adminQueries.crews());
  const [name, setName] = useState('');
  const invalidate = () => Promise.all([queryClient.invalidateQueries({ queryKey: adminQueries.all }), queryClient.invalidateQueries({ queryKey: auditQueries.all })]);
  const create = useMutation({
    mutationFn: () => adminApi.createCrew(name),
    onSuccess: async () => {
      setName('');
      await invalidate();
    },
  });
  return (
    <section aria-labelledby="crews-title" className="card space-y-3">
      <h2 id="crews-title" className="text-lg font-bold">Crews</h2>
      <ul className="divide-y divide-ink-100">
        {data?.items.map((c) => <CrewRow key={c.id} crew={c} onChanged={invalidate} />)}
        {data?.items.length === 0 && <li className="py-2 text-ink-700">No crews yet.</li>}
      </ul>
      <form
        className="flex flex-wrap items-end gap-2"
        aria-label="New crew"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate();
        }}
      >
        <div className="flex-1">
          <label htmlFor="crew-name" className="field-label">New crew</label>
          <input id="crew-name" className="field-input" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. Willow Ford crew" />
        </div>
        <button type="submit" className="btn-primary" disabled={create.isPending || !name.trim()}>Add crew</button>
      </form>
      {create.error && <p role="alert" className="field-error">{create.error.message}</p>}
    </section>
  );
}

function CrewRow({ crew, onChanged }: { crew: CrewItem; onChanged: () => Promise<unknown> }) {
  const [editing, setEditing] = useState(false);
  const [name, setName] = useState(crew.name);
  const rename = useMutation({
    mutationFn: () => adminApi.renameCrew(crew.id, name),
    onSuccess: async () => {
      setEditing(false);
      await onChanged();
    },
  });
  const remove = useMutation({ mutationFn: () => adminApi.deleteCrew(crew.id), onSuccess: onChanged });
  const error = rename.error ?? remove.error;
  return (
    <li className="py-2">
      {editing ? (
        <form
          className="flex flex-wrap items-center gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            rename.mutate();
          }}
        >
          <label className="sr-only" htmlFor={`crew-${crew.id}`}>Crew name</label>
          <input id={`crew-${crew.id}`} className="field-input flex-1" value={name} onChange={(e) => setName(e.target.value)} />
          <button type="submit" className="btn-primary" disabled={rename.isPending}>Save</button>
          <button type="button" className="btn-ghost" onClick={() => setEditing(false)}>Cancel</button>
        </form>
      ) : (
        <div className="flex flex-wrap items-center gap-2">
          <p className="flex-1">
            <span className="font-semibold">{crew.name}</span> <span className="text-ink-700">· {crew.memberCount} {crew.memberCount === 1 ? 'member' : 'members'}</span>
          </p>
          <button type="button" className="btn-ghost" onClick={() => setEditing(true)}>Rename</button>
          <button
            type="button"
            className="btn-ghost"
            disabled={crew.memberCount > 0 || remove.isPending}
            title={crew.memberCount > 0 ? 'Move its members to another crew first' : undefined}
            onClick={() => window.confirm(`Delete ${crew.name}?`) && remove.mutate()}
          >
            Delete
          </button>
        </div>
      )}
      {error && <p role="alert" className="field-error">{error.message}</p>}
    </li>
  );
}
