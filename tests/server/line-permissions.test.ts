// Line permissions (api.md "Line permissions"): who may enter them, the checks on their fields, the attached
// document judged by its content, expiry, concurrent entries, the audit trail, and the check a mission's
// authorisation makes.
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, type Client, type TestApp } from './helpers.ts';
import { LINE_69 } from './inventory-fixtures.ts';
import { linesLackingPermission, todayUtc } from '../../server/modules/line-permissions/line-permissions.service.ts';
import { AuditEntry } from '../../server/modules/audit/audit.entity.ts';

let t: TestApp;
let admin: Client, safety: Client, planner: Client, surveyor: Client;
let lineId: string;
let otherLineId: string;

/** A small PDF written by hand: header, one empty page, cross-reference table and the end-of-file marker. */
function minimalPdf() {
  const objects = ['<< /Type /Catalog /Pages 2 0 R >>', '<< /Type /Pages /Kids [3 0 R] /Count 1 >>', '<< /Type /Page /Parent 2 0 R /MediaBox [0 0 595 842] >>'];
  let body = '%PDF-1.4\n';
  const offsets: number[] = [];
  objects.forEach((o, i) => {
    offsets.push(body.length);
    body += `${i + 1} 0 obj\n${o}\nendobj\n`;
  });
  const xref = body.length;
  body += `xref\n0 ${objects.length + 1}\n0000000000 65535 f \n${offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('')}`;
  body += `trailer\n<< /Size ${objects.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
  return Buffer.from(body, 'latin1');
}

const year = Number(todayUtc().slice(0, 4));
const valid = { reference: 'HV-PERCH-0001', validFrom: `${year - 1}-01-01`, validTo: `${year + 1}-12-31`, conditions: 'Weekdays only; call the control room before the first perch.' };

beforeAll(async () => {
  t = await makeTestApp();
  [admin, safety, planner, surveyor] = await Promise.all([t.as('admin'), t.as('safety'), t.as('planner'), t.as('surveyor')]);
  const l = await surveyor.post('/api/lines', LINE_69);
  lineId = l.body.id;
  const o = await surveyor.post('/api/lines', { ...LINE_69, name: 'Test Ridge 2' });
  otherLineId = o.body.id;
});
afterAll(() => t?.close());

describe('entering permissions', () => {
  it('when safety enters a permission, then it answers 201 with every field and the line lists it, not expired', async () => {
    const res = await safety.post(`/api/lines/${lineId}/permissions`, valid);
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ lineId, reference: valid.reference, validFrom: valid.validFrom, validTo: valid.validTo, conditions: valid.conditions, expired: false, documentUrl: null });
    expect(res.body.createdByName).toBeTruthy();
    const list = await planner.get(`/api/lines/${lineId}/permissions`);
    expect(list.status).toBe(200);
    expect(list.body.items.map((p: { id: string }) => p.id)).toContain(res.body.id);
  });

  it('when an admin enters one, then it is saved; a planner or a surveyor gets 403 and nothing is saved', async () => {
    expect((await admin.post(`/api/lines/${lineId}/permissions`, { ...valid, reference: 'HV-ADMIN-1' })).status).toBe(201);
    const before = (await planner.get(`/api/lines/${lineId}/permissions`)).body.items.length;
    expect((await planner.post(`/api/lines/${lineId}/permissions`, { ...valid, reference: 'HV-PLANNER' })).status).toBe(403);
    expect((await surveyor.post(`/api/lines/${lineId}/permissions`, { ...valid, reference: 'HV-SURVEYOR' })).status).toBe(403);
    expect((await planner.get(`/api/lines/${lineId}/permissions`)).body.items.length).toBe(before);
  });

  it('when a permission ended before today, then it is listed and marked expired', async () => {
    const res = await safety.post(`/api/lines/${lineId}/permissions`, { reference: 'HV-OLD', validFrom: `${year - 3}-01-01`, validTo: `${year - 2}-12-31` });
    expect(res.status).toBe(201);
    expect(res.body.expired).toBe(true);
    expect(res.body.conditions).toBe('');
    const listed = (await planner.get(`/api/lines/${lineId}/permissions`)).body.items.find((p: { id: string }) => p.id === res.body.id);
    expect(listed.expired).toBe(true);
  });

  it.each([
    [{ ...valid, reference: '' }, 'reference'],
    [{ ...valid, reference: '   ' }, 'reference'],
    [{ ...valid, reference: 'A\u0007B' }, 'reference'],
    [{ ...valid, reference: undefined }, 'reference'],
    [{ ...valid, reference: 'X1', validFrom: '2026-02-30' }, 'validFrom'],
    [{ ...valid, reference: 'X2', validFrom: '1 June 2026' }, 'validFrom'],
    [{ ...valid, reference: 'X3', validTo: undefined }, 'validTo'],
    [{ ...valid, reference: 'X4', validFrom: '2026-06-02', validTo: '2026-06-01' }, 'validTo'],
    [{ ...valid, reference: 'X5', conditions: 42 }, 'conditions'],
    [{ ...valid, reference: 'X6', conditions: 'x'.repeat(4001) }, 'conditions'],
    [{ ...valid, reference: 'X7', colour: 'red' }, '(body)'],
  ])('when the body is %j, then 400 names %s and nothing is saved', async (body, field) => {
    const before = (await planner.get(`/api/lines/${lineId}/permissions`)).body.items.length;
    const res = await safety.post(`/api/lines/${lineId}/permissions`, body as object);
    expect(res.status).toBe(400);
    expect(res.body.error.issues.map((i: { path: string }) => i.path)).toContain(field);
    expect((await planner.get(`/api/lines/${lineId}/permissions`)).body.items.length).toBe(before);
  });

  it('when the line does not exist, then 404', async () => {
    expect((await safety.post('/api/lines/nope/permissions', valid)).status).toBe(404);
    expect((await planner.get('/api/lines/nope/permissions')).status).toBe(404);
  });

  it('when the same reference is entered for a line twice at once, then one is saved and the other answers 409 naming the reference', async () => {
    const body = { ...valid, reference: 'HV-RACE-7' };
    const results = await Promise.all(Array.from({ length: 6 }, () => safety.post(`/api/lines/${lineId}/permissions`, body)));
    expect(results.map((r) => r.status).sort()).toEqual([201, 409, 409, 409, 409, 409]);
    expect(results.find((r) => r.status === 409)!.body.error.issues[0].path).toBe('reference');
    const items = (await planner.get(`/api/lines/${lineId}/permissions`)).body.items.filter((p: { reference: string }) => p.reference === 'HV-RACE-7');
    expect(items).toHaveLength(1);
    // The same reference on another line is another owner's letter: allowed.
    expect((await safety.post(`/api/lines/${otherLineId}/permissions`, body)).status).toBe(201);
  });

  it('when several different permissions are entered at once, then every one is saved', async () => {
    const results = await Promise.all(Array.from({ length: 5 }, (_, i) => admin.post(`/api/lines/${otherLineId}/permissions`, { ...valid, reference: `HV-PAR-${i}` })));
    expect(results.map((r) => r.status)).toEqual([201, 201, 201, 201, 201]);
    expect(new Set(results.map((r) => r.body.id)).size).toBe(5);
  });

  it('when a permission is entered, then the audit log holds who entered what', async () => {
    const res = await safety.post(`/api/lines/${lineId}/permissions`, { ...valid, reference: 'HV-AUDIT' });
    const em = t.orm.em.fork();
    const entry = await em.findOneOrFail(AuditEntry, { recordType: 'line-permission', recordId: res.body.id });
    expect(entry.action).toBe('line-permission.create');
    expect(entry.actorId).toBe(res.body.createdById);
    expect(entry.after).toMatchObject({ reference: 'HV-AUDIT', validFrom: valid.validFrom, validTo: valid.validTo });
  });
});

describe('the owner’s document', () => {
  let permissionId: string;
  beforeAll(async () => {
    permissionId = (await safety.post(`/api/lines/${lineId}/permissions`, { ...valid, reference: 'HV-DOC' })).body.id;
  });
  const upload = (c: Client, buf: Buffer, name: string, field = 'document', pid = permissionId) =>
    c.upload(`/api/lines/${lineId}/permissions/${pid}/document`).attach(field, buf, name);

  it('when safety attaches a PDF, then the permission names it and the same bytes come back', async () => {
    const pdf = minimalPdf();
    const res = await upload(safety, pdf, 'Letter of permission — Harrow Vale.pdf');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ documentName: 'Letter of permission — Harrow Vale.pdf', documentContentType: 'application/pdf', documentBytes: pdf.length });
    const file = await planner.get(res.body.documentUrl).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(file.status).toBe(200);
    expect(file.headers['content-type']).toBe('application/pdf');
    expect(file.headers['x-content-type-options']).toBe('nosniff');
    expect(Buffer.compare(file.body as Buffer, pdf)).toBe(0);
    const listed = (await planner.get(`/api/lines/${lineId}/permissions`)).body.items.find((p: { id: string }) => p.id === permissionId);
    expect(listed.documentUrl).toBe(res.body.documentUrl);
  });

  it('when an image replaces it, then the image is kept, the old file is removed and both changes are audited', async () => {
    const before = (await planner.get(`/api/lines/${lineId}/permissions/${permissionId}`)).body;
    const png = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#c8a24a' } }).png().toBuffer();
    const res = await upload(admin, png, 'scan.pdf');
    expect(res.status).toBe(200);
    // Judged by its content, not its name.
    expect(res.body.documentContentType).toBe('image/png');
    expect(before.documentContentType).toBe('application/pdf');
    const docs = (await t.storage.list!('documents/')).map((k) => k.key.slice('documents/'.length)).filter((f) => f.startsWith(permissionId.toLowerCase()));
    expect(docs).toHaveLength(1);
    expect(docs[0]).toMatch(/\.png$/);
    const entries = await t.orm.em.fork().find(AuditEntry, { recordType: 'line-permission', recordId: permissionId, action: 'line-permission.document' });
    expect(entries).toHaveLength(2);
  });

  it('when the file is neither a PDF nor an image, then 415 and the stored document is unchanged', async () => {
    const before = (await planner.get(`/api/lines/${lineId}/permissions/${permissionId}`)).body;
    const res = await upload(safety, Buffer.from('reference,valid\nHV,2026\n'), 'permission.pdf');
    expect(res.status).toBe(415);
    expect(res.body.error.issues[0].path).toBe('document');
    expect((await planner.get(`/api/lines/${lineId}/permissions/${permissionId}`)).body).toEqual(before);
  });

  it('when a PDF is cut off, then 400 names the document', async () => {
    const pdf = minimalPdf();
    const res = await upload(safety, pdf.subarray(0, pdf.length - 40), 'cut.pdf');
    expect(res.status).toBe(400);
    expect(res.body.error.issues[0].path).toBe('document');
  });

  it('when no file or another field is sent, then 400 names the document field', async () => {
    const none = await safety.upload(`/api/lines/${lineId}/permissions/${permissionId}/document`).field('note', 'x');
    expect(none.status).toBe(400);
    expect(none.body.error.issues[0].path).toBe('document');
    const wrong = await upload(safety, minimalPdf(), 'a.pdf', 'photo');
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.issues[0].path).toBe('document');
  });

  it('when a planner or a surveyor attaches a document, then 403', async () => {
    expect((await upload(planner, minimalPdf(), 'a.pdf')).status).toBe(403);
    expect((await upload(surveyor, minimalPdf(), 'a.pdf')).status).toBe(403);
  });

  it('when the permission belongs to another line, then 404', async () => {
    const res = await safety.upload(`/api/lines/${otherLineId}/permissions/${permissionId}/document`).attach('document', minimalPdf(), 'a.pdf');
    expect(res.status).toBe(404);
  });
});

describe('the check a mission’s authorisation makes', () => {
  it('when a line has a permission covering the day, then it is not lacking; on the day after its last day it is', async () => {
    const a = (await surveyor.post('/api/lines', { ...LINE_69, name: 'Check Line A' })).body.id;
    const b = (await surveyor.post('/api/lines', { ...LINE_69, name: 'Check Line B' })).body.id;
    await safety.post(`/api/lines/${a}/permissions`, { reference: 'A-1', validFrom: '2026-03-01', validTo: '2026-06-30' });
    await safety.post(`/api/lines/${a}/permissions`, { reference: 'A-0', validFrom: '2025-01-01', validTo: '2025-12-31' });
    const em = t.orm.em.fork();
    expect(await linesLackingPermission(em, [a, b, a], '2026-06-30')).toEqual([{ lineId: b, lineName: 'Check Line B' }]);
    expect(await linesLackingPermission(em, [a], '2026-03-01')).toEqual([]);
    expect(await linesLackingPermission(em, [a], '2026-07-01')).toEqual([{ lineId: a, lineName: 'Check Line A' }]);
    expect(await linesLackingPermission(em, [a], '2026-02-28')).toEqual([{ lineId: a, lineName: 'Check Line A' }]);
    expect(await linesLackingPermission(em, [], '2026-02-28')).toEqual([]);
  });
});
