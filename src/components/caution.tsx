/** The caution shown beside every safety-relevant figure (clearances, approach distances, perching on a live line). */
export function Caution({ compact = false, mission = false }: { compact?: boolean; /** Mission plans: airspace rules and the pilot's judgement too. */ mission?: boolean }) {
  return (
    <p role="note" className={`rounded-lg border border-brass-300 bg-brass-100 text-ink-900 ${compact ? 'px-2 py-1 text-xs' : 'p-3 text-sm'}`}>
      {mission ? (
        <>
          <strong>Caution:</strong> this plan supports the flight and never replaces the line owner's authorisation, the airspace rules or the pilot's own judgement. Approach figures defer to local codes and licensed practice.
        </>
      ) : (
        <>
          <strong>Caution:</strong> these figures support planning only. They never replace the line owner's authorisation, local codes and licensed practice.
        </>
      )}
    </p>
  );
}
