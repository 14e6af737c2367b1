// The changes of one history or audit entry, each "Field before → after" in words (src/lib/history.ts).
import type { FieldChange } from '../lib/history.ts';

export function ChangeList({ changes, emptyText = 'No field changes recorded.' }: { changes: FieldChange[]; emptyText?: string }) {
  if (changes.length === 0) return emptyText ? <p className="text-sm text-ink-500">{emptyText}</p> : null;
  return (
    <table className="w-full text-sm" aria-label="Changes">
      <thead className="sr-only">
        <tr><th>Field</th><th>Before</th><th>After</th></tr>
      </thead>
      <tbody>
        {changes.map((c) => (
          <tr key={c.field} className="align-top">
            <th scope="row" className="py-0.5 pr-3 text-left font-semibold text-ink-800">{c.field}</th>
            {c.before ? (
              <>
                <td className="py-0.5 pr-2 text-ink-700">{c.before}</td>
                <td className="px-1 py-0.5 text-ink-500" aria-label="became">→</td>
              </>
            ) : (
              <td colSpan={2} />
            )}
            <td className="py-0.5 font-semibold text-ink-900">{c.after}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
