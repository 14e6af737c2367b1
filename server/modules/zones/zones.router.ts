import { generateIdFromEntropySize } from 'lucia';
import { z } from 'zod';
import type { AppContext } from '../../context.ts';
import { featureRouter, currentUser } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';
import { audit } from '../audit/audit.service.ts';
import { Zone } from './zone.entity.ts';
import { zoneCreateSchema, zoneDatesSchema, zoneUpdateSchema } from './zone.schema.ts';
import { notifyZoneChange, zoneSnapshot, zoneToFeature, zonesToFeatureCollection, isZoneActive } from './zone.service.ts';

const listQuery = z.object({
  active: z.enum(['true', 'false'], { error: 'active is "true" or "false"' }).optional(),
  severity: z.enum(['exclude', 'caution'], { error: 'severity is "exclude" or "caution"' }).optional(),
});

/** No-perch zones: everyone signed in reads them; the safety role draws, edits and deletes them. */
export function zonesRouter(_ctx: AppContext) {
  const r = featureRouter('/api/zones');

  r.get('/', 'signed-in', async (req, res) => {
    const q = parse(listQuery, req.query);
    const now = new Date();
    let zones = await req.em.find(Zone, q.severity ? { severity: q.severity } : {}, { orderBy: { createdAt: 'asc' } });
    if (q.active) zones = zones.filter((zone) => isZoneActive(zone, now) === (q.active === 'true'));
    res.json(zonesToFeatureCollection(zones, now));
  });

  r.get('/:id', 'signed-in', async (req, res) => {
    const zone = await req.em.findOne(Zone, { id: String(req.params.id) });
    if (!zone) throw AppError.notFound('Zone');
    res.json(zoneToFeature(zone));
  });

  r.post('/', ['safety'], async (req, res) => {
    const input = parse(zoneCreateSchema, req.body);
    const user = currentUser(req);
    const now = new Date();
    const zone = req.em.create(Zone, {
      id: generateIdFromEntropySize(10),
      name: input.name,
      reason: input.reason,
      severity: input.severity,
      geometry: { type: 'Polygon', coordinates: input.geometry.coordinates },
      validFrom: input.validFrom ?? null,
      validTo: input.validTo ?? null,
      createdById: user.id,
      version: 1,
      createdAt: now,
      updatedAt: now,
    });
    audit(req.em, { actorId: user.id, action: 'zone.create', recordType: 'zone', recordId: zone.id, before: null, after: zoneSnapshot(zone) });
    await req.em.flush();
    await notifyZoneChange(req.em, { action: 'create', zoneId: zone.id, before: null, after: zone.geometry });
    res.status(201).json(zoneToFeature(zone));
  });

  r.patch('/:id', ['safety'], async (req, res) => {
    const input = parse(zoneUpdateSchema, req.body);
    const user = currentUser(req);
    const zone = await req.em.findOne(Zone, { id: String(req.params.id) });
    if (!zone) throw AppError.notFound('Zone');
    if (input.version !== zone.version) {
      throw AppError.conflict(`This zone was changed by someone else (now version ${zone.version}); reload it and apply your edit again`, [
        { path: 'version', message: `Current version is ${zone.version}` },
      ]);
    }
    const before = zoneSnapshot(zone);
    const next = {
      validFrom: input.validFrom !== undefined ? input.validFrom : zone.validFrom,
      validTo: input.validTo !== undefined ? input.validTo : zone.validTo,
    };
    parse(zoneDatesSchema, next);
    if (input.name !== undefined) zone.name = input.name;
    if (input.reason !== undefined) zone.reason = input.reason;
    if (input.severity !== undefined) zone.severity = input.severity;
    if (input.geometry !== undefined) zone.geometry = { type: 'Polygon', coordinates: input.geometry.coordinates };
    zone.validFrom = next.validFrom;
    zone.validTo = next.validTo;
    zone.version += 1;
    zone.updatedAt = new Date();
    audit(req.em, { actorId: user.id, action: 'zone.update', recordType: 'zone', recordId: zone.id, before, after: zoneSnapshot(zone) });
    await req.em.flush();
    await notifyZoneChange(req.em, { action: 'update', zoneId: zone.id, before: before.geometry, after: zone.geometry });
    res.json(zoneToFeature(zone));
  });

  r.delete('/:id', ['safety'], async (req, res) => {
    const user = currentUser(req);
    const zone = await req.em.findOne(Zone, { id: String(req.params.id) });
    if (!zone) throw AppError.notFound('Zone');
    const { version } = parse(z.object({ version: z.coerce.number({ error: 'version must be a number' }).int().optional() }), req.query);
    if (version !== undefined && version !== zone.version) {
      throw AppError.conflict(`This zone was changed by someone else (now version ${zone.version}); reload it before deleting`);
    }
    const before = zoneSnapshot(zone);
    audit(req.em, { actorId: user.id, action: 'zone.delete', recordType: 'zone', recordId: zone.id, before, after: null });
    req.em.remove(zone);
    await req.em.flush();
    await notifyZoneChange(req.em, { action: 'delete', zoneId: zone.id, before: before.geometry, after: null });
    res.status(204).end();
  });

  return r.router;
}
