// The plan request a saved mission was made from, wherever the server keeps it (under `input`, `request` or at the top).
import type { Mission, PlanRequest } from './types.ts';

/** The plan request a saved mission was made from, wherever the server keeps it. */
export function missionRequest(m: Mission): Partial<PlanRequest> {
  const r = m.input ?? m.request;
  return {
    droneProfileId: r?.droneProfileId ?? m.droneProfileId,
    harvesterProfileId: r?.harvesterProfileId ?? m.harvesterProfileId,
    base: r?.base ?? m.base,
    target: r?.target ?? m.target,
    departAt: r?.departAt ?? m.departAt,
    wind: r?.wind ?? m.wind ?? undefined,
    returnToBase: r?.returnToBase ?? m.returnToBase,
    objective: r?.objective ?? m.objective,
    perchPoints: r?.perchPoints ?? [],
  };
}
