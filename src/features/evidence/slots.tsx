// What the load-evidence feature renders in other features' span slots (wired in src/app/router.tsx).
import type { ReactNode } from 'react';
import type { Span } from '#shared/schemas/inventory.ts';
import { SpanEvidenceFlag } from './components/span-evidence-flag.tsx';
import { MissionFlown, type MissionForFlown } from './components/mission-flown.tsx';

/** Review desk and span page: the measured-harvest flag (nothing when no flight has measured the span). */
export function spanEvidenceSlot(span: Span): ReactNode {
  return <SpanEvidenceFlag spanId={span.id} lineName={span.lineName} />;
}

type PerchNames = { spanId: string; spanLabel?: string; fromStructureLabel?: string; toStructureLabel?: string };

/** A saved mission's page: the plan against its latest flight record (and the upload for it). */
export function missionFlownSlot(mission: { id: string; departAt?: string; plan: MissionForFlown['plan'] & { perches?: PerchNames[] } }): ReactNode {
  const names: Record<string, string> = {};
  for (const p of mission.plan.perches ?? []) {
    const label = p.spanLabel ?? (p.fromStructureLabel && p.toStructureLabel ? `${p.fromStructureLabel} → ${p.toStructureLabel}` : null);
    if (label) names[p.spanId] = `Span ${label}`;
  }
  return <MissionFlown mission={{ id: mission.id, departAt: mission.departAt, plan: mission.plan, perchNames: names }} />;
}
