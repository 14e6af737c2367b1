/** The caution shown beside every safety-relevant figure (clearances, approach distances, perching on a live line). */
export function Caution({ compact = false }: { compact?: boolean }) {
  return (
    <p role="note" className={`rounded-lg border border-brass-300 bg-brass-100 text-ink-900 ${compact ? 'px-2 py-1 text-xs' : 'p-3 text-sm'}`}>
      <strong>Caution:</strong> these figures support planning only. They never replace the line owner's authorisation, local codes and licensed practice.
    </p>
  );
}
