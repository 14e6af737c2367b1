// Battery recharge time from a harvested power, SI units.

/** Typical battery charge efficiency at moderate C-rate (common practice). */
export const DEFAULT_BATTERY_EFFICIENCY = 0.95;

// Energy balance: t = ΔSOC·E_batt / (P_harv·η_conv·η_batt), in seconds; Infinity when nothing is harvested.
export function chargeTimeS(params: {
  deltaSoc: number;
  batteryWh: number;
  harvestW: number;
  converterEfficiency: number;
  batteryEfficiency?: number;
}): number {
  const eta = params.converterEfficiency * (params.batteryEfficiency ?? DEFAULT_BATTERY_EFFICIENCY);
  const deliveredW = params.harvestW * eta;
  if (!(deliveredW > 0)) return Number.POSITIVE_INFINITY;
  return (Math.max(0, params.deltaSoc) * params.batteryWh * 3600) / deliveredW;
}

// Same energy balance in minutes.
export function chargeTimeMin(params: Parameters<typeof chargeTimeS>[0]): number {
  return chargeTimeS(params) / 60;
}
