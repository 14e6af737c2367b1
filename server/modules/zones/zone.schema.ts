import { z } from 'zod';
import { kinks, polygon as turfPolygon } from '@turf/turf';

const isoDate = z.iso.date({ error: 'Use a date in the form YYYY-MM-DD' });

const position = z
  .array(z.number({ error: 'A coordinate must be a number' }), { error: 'A position is [longitude, latitude]' })
  .min(2, { error: 'A position is [longitude, latitude]' })
  .max(3, { error: 'A position is [longitude, latitude] or [longitude, latitude, altitude]' })
  .superRefine((p, ctx) => {
    if (p[0] < -180 || p[0] > 180) ctx.addIssue({ code: 'custom', path: [0], message: 'Longitude must be between -180 and 180' });
    if (p[1] < -90 || p[1] > 90) ctx.addIssue({ code: 'custom', path: [1], message: 'Latitude must be between -90 and 90' });
  });

/** A GeoJSON Polygon that is fit to be a zone: closed rings of ≥ 4 positions that do not cross themselves. */
export const zonePolygonSchema = z
  .object({
    type: z.literal('Polygon', { error: 'The geometry must be a GeoJSON Polygon' }),
    coordinates: z.array(z.array(position, { error: 'A ring is a list of positions' }), { error: 'Polygon coordinates are a list of rings' }).min(1, { error: 'A polygon needs an outer ring' }),
  })
  .superRefine((g, ctx) => {
    let ringsOk = true;
    g.coordinates.forEach((ring, i) => {
      if (ring.length < 4) {
        ringsOk = false;
        ctx.addIssue({ code: 'custom', path: ['coordinates', i], message: `A ring needs at least 4 positions (3 corners, then the first repeated to close it); this one has ${ring.length}` });
        return;
      }
      const first = ring[0];
      const last = ring[ring.length - 1];
      if (first[0] !== last[0] || first[1] !== last[1]) {
        ringsOk = false;
        ctx.addIssue({ code: 'custom', path: ['coordinates', i], message: 'The ring is not closed: its last position must repeat the first' });
      }
      const distinct = new Set(ring.slice(0, -1).map((p) => `${p[0]},${p[1]}`));
      if (distinct.size < 3) {
        ringsOk = false;
        ctx.addIssue({ code: 'custom', path: ['coordinates', i], message: 'A ring needs at least 3 distinct corners' });
      }
    });
    if (!ringsOk) return;
    try {
      const crossings = kinks(turfPolygon(g.coordinates as number[][][]));
      if (crossings.features.length > 0) {
        const [lon, lat] = crossings.features[0].geometry.coordinates;
        ctx.addIssue({ code: 'custom', path: ['coordinates'], message: `The polygon crosses itself (near ${lon.toFixed(5)}, ${lat.toFixed(5)}); redraw it so its edges do not cross` });
      }
    } catch (e) {
      ctx.addIssue({ code: 'custom', path: ['coordinates'], message: `The polygon is not valid: ${(e as Error).message}` });
    }
  });

const severity = z.enum(['exclude', 'caution'], { error: 'Severity is "exclude" or "caution"' });
const name = z.string({ error: 'Give the zone a name' }).trim().min(1, { error: 'Give the zone a name' }).max(120, { error: 'Keep the name to 120 characters' });
const reason = z.string({ error: 'Say why perching is restricted here' }).trim().min(1, { error: 'Say why perching is restricted here' }).max(2000, { error: 'Keep the reason to 2000 characters' });

function checkDates(v: { validFrom?: string | null; validTo?: string | null }, ctx: z.RefinementCtx) {
  if (v.validFrom && v.validTo && v.validTo < v.validFrom) {
    ctx.addIssue({ code: 'custom', path: ['validTo'], message: 'The end date must be on or after the start date' });
  }
}

export const zoneCreateSchema = z
  .object({
    name,
    reason,
    severity,
    geometry: zonePolygonSchema,
    validFrom: isoDate.nullable().optional(),
    validTo: isoDate.nullable().optional(),
  })
  .superRefine(checkDates);

export const zoneUpdateSchema = z.object({
  version: z.number({ error: 'Send the version you edited' }).int().min(1),
  name: name.optional(),
  reason: reason.optional(),
  severity: severity.optional(),
  geometry: zonePolygonSchema.optional(),
  validFrom: isoDate.nullable().optional(),
  validTo: isoDate.nullable().optional(),
});

export const zoneDatesSchema = z.object({ validFrom: z.string().nullable(), validTo: z.string().nullable() }).superRefine(checkDates);

export type ZoneCreateInput = z.infer<typeof zoneCreateSchema>;
export type ZoneUpdateInput = z.infer<typeof zoneUpdateSchema>;
