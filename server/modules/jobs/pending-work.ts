// Owed work recorded by earlier versions of the server (before jobs were kept in the `jobs` table): a start-up
// turns each row into a job and removes the row, so nothing owed before an upgrade is lost.
import type { AppContext } from '../../context.ts';
import { sql } from '../../sql/query.ts';

export interface PendingRow {
  key: string;
  kind: string;
  payload: unknown;
  reason: string;
  requestedAt: number;
}

export async function listPending(ctx: AppContext): Promise<PendingRow[]> {
  const rows = await sql.all<{ key: string; kind: string; payload: string; reason: string; requested_at: number }>(
    ctx.orm.em.fork(),
    'select key, kind, payload, reason, requested_at from pending_work order by requested_at, key',
  );
  return rows.map((r) => ({ key: r.key, kind: r.kind, payload: JSON.parse(r.payload), reason: r.reason, requestedAt: Number(r.requested_at) }));
}

export async function clearPending(ctx: AppContext, key: string): Promise<void> {
  await sql.run(ctx.orm.em.fork(), 'delete from pending_work where key = ?', [key]);
}
