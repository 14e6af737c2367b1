// Roostline's own status palette (the theme's ink, brass, go, alarm and ink-900 of src/index.css),
// one source for the map's span styling and the KML export, so both look like the app.
import type { SpanStatus } from './schemas/inventory.ts';

export const SPAN_STATUS_COLOURS: Record<SpanStatus, string> = {
  draft: '#6f8a8f',
  submitted: '#d99a1e',
  approved: '#2e7d4f',
  returned: '#b3261e',
  suspended: '#12343b',
};

/** '#rrggbb' → KML's 'aabbggrr' (OGC KML 2.2, 07-147r2 §16.9 kml:color), opaque unless `alpha` (0–255) is given. */
export function kmlColour(hex: string, alpha = 255): string {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`);
  return (alpha.toString(16).padStart(2, '0') + m[3] + m[2] + m[1]).toLowerCase();
}
