import type { HazardSeverityLevel } from '#shared/schemas/inventory.ts';

/** The hazard catalogue a new database starts with; the safety role adds, renames and retires kinds. */
export const DEFAULT_HAZARD_KINDS: readonly { id: string; label: string; defaultSeverity: HazardSeverityLevel }[] = [
  { id: 'vegetation-encroachment', label: 'Vegetation encroachment', defaultSeverity: 'medium' },
  { id: 'road-crossing', label: 'Road crossing', defaultSeverity: 'medium' },
  { id: 'rail-crossing', label: 'Rail crossing', defaultSeverity: 'high' },
  { id: 'water-crossing', label: 'Water crossing', defaultSeverity: 'medium' },
  { id: 'crossing-circuit', label: 'Crossing circuit', defaultSeverity: 'high' },
  { id: 'spacer-or-damper', label: 'Spacer or damper', defaultSeverity: 'low' },
  { id: 'marker-ball-or-bird-diverter', label: 'Marker ball or bird diverter', defaultSeverity: 'medium' },
  { id: 'nearby-structure', label: 'Nearby structure', defaultSeverity: 'low' },
  { id: 'public-access', label: 'Public access', defaultSeverity: 'medium' },
];
