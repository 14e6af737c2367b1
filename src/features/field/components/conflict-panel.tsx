// Shown when a save hits a newer version: both readings side by side, the user picks per field.
import { useMemo, useState } from 'react';
import type { Span } from '#shared/schemas/inventory.ts';
import type { UnitSystem } from '#shared/units.ts';
import { compareWithSaved, type ConflictKey, type ConflictLookups } from '../conflict.ts';
import type { SpanFormValues } from '../form-values.ts';

interface Props {
  mine: SpanFormValues;
  /** The values the user started from; fields they did not touch default to the saved reading. */
  base?: SpanFormValues;
  saved: Span;
  unitSystem: UnitSystem;
  lookups: ConflictLookups;
  busy: boolean;
  /** Continue from the saved version, with the user's values for the keys chosen; `save` re-applies at once. */
  onResolve: (takeMine: Set<ConflictKey>, save: boolean) => void;
}

export function ConflictPanel({ mine, base, saved, unitSystem, lookups, busy, onResolve }: Props) {
  const rows = useMemo(() => compareWithSaved(mine, saved, unitSystem, lookups, base), [mine, saved, unitSystem, lookups, base]);
  const differing = rows.filter((r) => r.differs);
  const [choice, setChoice] = useState<Record<string, 'mine' | 'saved'>>(() => Object.fromEntries(differing.map((r) => [r.key, r.changedByMe ? 'mine' : 'saved'])));
  const takeMine = () => new Set(differing.filter((r) => choice[r.key] !== 'saved').map((r) => r.key));

  return (
    <section role="alertdialog" aria-labelledby="conflict-title" aria-describedby="conflict-text" className="card space-y-4 border-2 border-brass-500">
      <h2 id="conflict-title" className="text-xl font-bold">Someone saved this span while you were editing</h2>
      <p id="conflict-text" className="text-ink-700">
        The saved record is now version {saved.version}. Nothing of yours was lost and nothing was overwritten: choose, field by field, what to keep.
      </p>
      {differing.length === 0 ? (
        <p>Your values and the saved ones are the same; saving again applies them to the new version.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-left">
            <thead>
              <tr className="border-b border-ink-200 text-sm text-ink-700">
                <th className="py-2 pr-3">Field</th>
                <th className="py-2 pr-3">Your change</th>
                <th className="py-2">Saved record</th>
              </tr>
            </thead>
            <tbody>
              {differing.map((r) => (
                <tr key={r.key} className="border-b border-ink-100 align-top" data-conflict-field={r.key}>
                  <th scope="row" className="py-2 pr-3 font-semibold">
                    {r.label}
                    <span className="block text-xs font-normal text-ink-700">{r.changedByMe ? 'you changed this' : 'changed by someone else'}</span>
                  </th>
                  <td className="py-2 pr-3">
                    <label className="touch-choice w-full justify-start gap-3 has-[:checked]:border-ink-900 has-[:checked]:bg-brass-100">
                      <input type="radio" name={`conflict-${r.key}`} checked={choice[r.key] !== 'saved'} onChange={() => setChoice((c) => ({ ...c, [r.key]: 'mine' }))} />
                      <span><span className="sr-only">{r.label}: keep mine, </span>{r.mine}</span>
                    </label>
                  </td>
                  <td className="py-2">
                    <label className="touch-choice w-full justify-start gap-3 has-[:checked]:border-ink-900 has-[:checked]:bg-ink-50">
                      <input type="radio" name={`conflict-${r.key}`} checked={choice[r.key] === 'saved'} onChange={() => setChoice((c) => ({ ...c, [r.key]: 'saved' }))} />
                      <span><span className="sr-only">{r.label}: keep saved, </span>{r.saved}</span>
                    </label>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <div className="flex flex-wrap gap-3">
        <button type="button" className="btn-primary min-h-12" disabled={busy} onClick={() => onResolve(takeMine(), true)}>
          Save my choices on version {saved.version}
        </button>
        <button type="button" className="btn-ghost min-h-12" disabled={busy} onClick={() => onResolve(new Set(), false)}>
          Keep the saved record
        </button>
      </div>
    </section>
  );
}
