// A saved mission as files (api.md "Missions": export.gpx, export.geojson, export.kml); every role may read them.
import type { Request, Response } from 'express';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter } from '../../http/access.ts';
import { AppError } from '../../http/errors.ts';
import { missionToGeoJson, missionToGpx, missionToKml, type ExportMission, type ExportPlan } from './export.ts';
import { getMission, viewOf } from './missions.service.ts';

/** A file name from the mission's name: letters, digits and dashes only. */
export function exportFileName(name: string, ext: string) {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return `${slug || 'mission'}.${ext}`;
}

async function exportable(req: Request): Promise<ExportMission> {
  const view = await viewOf(req.em, await getMission(req.em, String(req.params.id)));
  const plan = view.plan as unknown as ExportPlan & { feasible: boolean };
  if (!plan?.feasible || !Array.isArray(plan.legs) || plan.legs.length === 0)
    throw AppError.conflict('This mission has no route to export; plan it again first.', [{ path: 'plan', message: 'no feasible route' }]);
  return { id: view.id, name: view.name, plan, plannerName: view.plannerName, authorisedByName: view.authorisedByName, authorisedAt: view.authorisedAt };
}

function send(res: Response, body: string, type: string, fileName: string) {
  res.set({
    'Content-Type': `${type}; charset=utf-8`,
    'Content-Disposition': `attachment; filename="${fileName}"`,
    'Cache-Control': 'private, no-cache',
    'X-Content-Type-Options': 'nosniff',
  });
  res.send(body);
}

/** Mounted at /api/missions beside the missions router. */
export function missionExportsRouter(_ctx: AppContext) {
  const r = featureRouter('/api/missions');
  r.get('/:id/export.gpx', 'signed-in', async (req, res) => {
    const m = await exportable(req);
    // GPX 1.1 has its own media type (application/gpx+xml, as registered by its readers); plain XML readers open it too.
    send(res, missionToGpx(m, { units: currentUser(req).unitSystem }), 'application/gpx+xml', exportFileName(m.name, 'gpx'));
  });
  r.get('/:id/export.geojson', 'signed-in', async (req, res) => {
    const m = await exportable(req);
    // RFC 7946 §12: application/geo+json.
    send(res, JSON.stringify(missionToGeoJson(m, { units: currentUser(req).unitSystem }), null, 1), 'application/geo+json', exportFileName(m.name, 'geojson'));
  });
  r.get('/:id/export.kml', 'signed-in', async (req, res) => {
    const m = await exportable(req);
    // OGC KML 2.2: application/vnd.google-earth.kml+xml.
    send(res, missionToKml(m, { units: currentUser(req).unitSystem }), 'application/vnd.google-earth.kml+xml', exportFileName(m.name, 'kml'));
  });
  return r.router;
}
