import type { EntityManager } from '@mikro-orm/sqlite';
import { auditQuerySchema, type AuditItem } from '#shared/schemas/accounts.ts';
import type { AppContext } from '../../context.ts';
import { currentUser, featureRouter, hasRole } from '../../http/access.ts';
import { AppError, parse } from '../../http/errors.ts';
import { User } from '../auth/user.entity.ts';
import { Span } from '../inventory/span.entity.ts';
import { AuditEntry } from './audit.entity.ts';
import { SPAN_RELATED_RECORD_TYPES } from './audit.service.ts';
import { sql } from '../../sql/query.ts';
import { jsonTextField } from '../../sql/dialect.ts';

async function toItems(em: EntityManager, entries: AuditEntry[]): Promise<AuditItem[]> {
  const ids = [...new Set(entries.map((e) => e.actorId).filter((id): id is string => !!id))];
  const names = new Map((await em.find(User, { id: { $in: ids } })).map((u) => [u.id, u.name]));
  return entries.map((e) => ({
    id: e.id,
    at: e.at.toISOString(),
    actorId: e.actorId,
    actorName: e.actorId ? (names.get(e.actorId) ?? null) : null,
    action: e.action,
    recordType: e.recordType,
    recordId: e.recordId,
    before: e.before,
    after: e.after,
  }));
}

const startOf = (d: string) => new Date(d.length === 10 ? `${d}T00:00:00Z` : d);
/** A bare date as the upper bound includes that whole day. */
const endOf = (d: string) => (d.length === 10 ? new Date(new Date(`${d}T00:00:00Z`).getTime() + 86_400_000) : new Date(new Date(d).getTime() + 1));

/**
 * The audit log: admins read all of it, safety officers the span-related part.
 * Every signed-in role reads one span's own history (the span page shows it).
 */
export function auditRouter(_ctx: AppContext) {
  const r = featureRouter('/api/audit');

  r.get('/', ['admin', 'safety'], async (req, res) => {
    const q = parse(auditQuerySchema, req.query);
    const user = currentUser(req);
    const where: Record<string, unknown> = {};
    const seesAll = hasRole(user, 'admin');
    if (q.recordType) {
      if (!seesAll && !SPAN_RELATED_RECORD_TYPES.includes(q.recordType)) throw AppError.forbidden('Your role reads the span-related part of the audit log only');
      where.recordType = q.recordType;
    } else if (!seesAll) {
      where.recordType = { $in: SPAN_RELATED_RECORD_TYPES };
    }
    if (q.userId) where.actorId = q.userId;
    if (q.recordId) where.recordId = q.recordId;
    if (q.action) where.action = q.action.endsWith('.') ? { $like: `${q.action}%` } : q.action;
    if (q.from || q.to) where.at = { ...(q.from ? { $gte: startOf(q.from) } : {}), ...(q.to ? { $lt: endOf(q.to) } : {}) };
    const [entries, total] = await req.em.findAndCount(AuditEntry, where, { orderBy: { at: 'desc', id: 'desc' }, limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
    res.json({ items: await toItems(req.em, entries), total, page: q.page, pageSize: q.pageSize });
  });

  // What the filters offer: the actions and record types present in the part of the log the role reads.
  r.get('/facets', ['admin', 'safety'], async (req, res) => {
    const seesAll = hasRole(currentUser(req), 'admin');
    const rows = await sql.all<{ action: string; record_type: string }>(req.em, 'select distinct action, record_type from audit_entries order by action');
    const visible = rows.filter((r) => seesAll || SPAN_RELATED_RECORD_TYPES.includes(r.record_type));
    const actors = await req.em.find(User, {}, { orderBy: { name: 'asc' } });
    res.json({
      actions: [...new Set(visible.map((r) => r.action))],
      recordTypes: [...new Set(visible.map((r) => r.record_type))].sort(),
      users: actors.map((u) => ({ id: u.id, name: u.name })),
    });
  });

  // One span's history: its own entries and those of its hazards and photos (which carry its spanId).
  r.get('/spans/:id', 'signed-in', async (req, res) => {
    const spanId = req.params.id as string;
    if (!(await req.em.findOne(Span, { id: spanId }, { fields: ['id'] }))) throw AppError.notFound('Span');
    const rows = await sql.all<{ id: number }>(
      req.em,
      `select id from audit_entries
        where (record_type = 'span' and record_id = ?)
           or (record_type in ('hazard', 'photo') and (${jsonTextField(req.em, '"after"', 'spanId')} = ? or ${jsonTextField(req.em, '"before"', 'spanId')} = ?))
        order by at desc, id desc limit 500`,
      [spanId, spanId, spanId],
    );
    const entries = await req.em.find(AuditEntry, { id: { $in: rows.map((r) => r.id) } }, { orderBy: { at: 'desc', id: 'desc' } });
    res.json({ items: await toItems(req.em, entries) });
  });
  return r.router;
}
