/** A labelled progress bar; `value` null = working, amount unknown. */
export function ProgressBar({ label, value, detail }: { label: string; value: number | null; detail?: string }) {
  const pct = value === null ? null : Math.round(Math.min(1, Math.max(0, value)) * 100);
  return (
    <div className="space-y-1">
      <div className="flex justify-between text-sm font-semibold">
        <span>{label}</span>
        <span>{pct === null ? (detail ?? 'working…') : `${pct} %${detail ? ` · ${detail}` : ''}`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct ?? undefined}
        className="h-3 overflow-hidden rounded-full bg-ink-100"
      >
        <div className={`h-full rounded-full bg-brass-500 transition-[width] ${pct === null ? 'w-1/3 animate-pulse' : ''}`} style={pct === null ? undefined : { width: `${pct}%` }} />
      </div>
    </div>
  );
}
