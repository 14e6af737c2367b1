// The field outbox: writes made without a signal (or while earlier ones still wait) kept in IndexedDB and sent
// in the order they were made, once each. Creates carry an Idempotency-Key (the item's id), so a retry after a
// lost answer gets the first answer back instead of a second record. Records made offline have client ids
// ("local-…") that later writes may use; each is swapped for the server's id once its create has been answered.
import { createStore, del, get, set } from 'idb-keyval';
import { onlineManager } from '@tanstack/react-query';
import type { ApiErrorBody } from '#shared/api-error.ts';
import { api, ApiError } from './api.ts';

export type OutboxKind = 'structure.create' | 'span.create' | 'span.update' | 'span.submit' | 'photo.upload';
/** waiting: will be sent; sending: on its way; failed: refused (retry or discard); conflict: the record changed meanwhile. */
export type OutboxState = 'waiting' | 'sending' | 'failed' | 'conflict';

export interface OutboxItem {
  id: string;
  seq: number;
  userId: string;
  kind: OutboxKind;
  /** What it is, in words, for the outbox page. */
  label: string;
  method: 'POST' | 'PATCH';
  url: string;
  body: unknown;
  /** Creates: the client id of the record this makes. */
  clientId?: string;
  /** Every record id (client or server) this write is about: a later write on the same record waits for it. */
  touches: string[];
  /** span.submit: the version is the span's latest once the writes before it are answered. */
  latestVersionOf?: string;
  /** What the screens show for a record made offline (a Structure or Span shape), and the form's own entries. */
  preview?: unknown;
  formValues?: unknown;
  baseFormValues?: unknown;
  /** photo.upload: the file is kept beside the queue under this key; EXIF read on the device. */
  photo?: { blobKey: string; fileName: string; size: number; type: string; spanId: string | null; takenAt: string | null; lat: number | null; lon: number | null };
  createdAt: string;
  state: OutboxState;
  error: string | null;
  attempts: number;
  /** conflict: the saved record the server answered with. */
  current?: unknown;
}

export interface OutboxSnapshot {
  loaded: boolean;
  items: OutboxItem[];
  sending: boolean;
  /** The server said the session ended: nothing is sent until the surveyor signs in again. */
  needsSignIn: boolean;
  /** Upload progress (0…1) of the photo being sent, by item id. */
  progress: Record<string, number>;
  /** Client id → server id, for records whose create has been answered. */
  ids: Record<string, string>;
}

const LOCAL_PREFIX = 'local-';
export const isLocalId = (id: string | null | undefined): id is string => !!id && id.startsWith(LOCAL_PREFIX);

function uuid(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  // randomUUID needs a secure context; getRandomValues does not.
  const b = crypto.getRandomValues(new Uint8Array(16));
  b[6] = (b[6]! & 0x0f) | 0x40;
  b[8] = (b[8]! & 0x3f) | 0x80;
  const h = [...b].map((x) => x.toString(16).padStart(2, '0')).join('');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-${h.slice(12, 16)}-${h.slice(16, 20)}-${h.slice(20)}`;
}
export const newClientId = () => `${LOCAL_PREFIX}${uuid()}`;

/** Online for sending: TanStack's online manager (online/offline events) and the browser's own flag agree. */
export const deviceOnline = () => onlineManager.isOnline() && (typeof navigator === 'undefined' || navigator.onLine !== false);

const canStore = typeof indexedDB !== 'undefined';
const store = canStore ? createStore('roostline-outbox', 'outbox') : undefined;

let snapshot: OutboxSnapshot = { loaded: !canStore, items: [], sending: false, needsSignIn: false, progress: {}, ids: {} };
let versions: Record<string, number> = {};
const listeners = new Set<() => void>();

function publish(change: Partial<OutboxSnapshot>) {
  snapshot = { ...snapshot, ...change };
  for (const l of listeners) l();
}

async function save() {
  if (!store) return;
  await set('state', { items: snapshot.items, ids: snapshot.ids, versions, needsSignIn: snapshot.needsSignIn }, store);
}

export const outboxReady: Promise<void> = (async () => {
  if (!store) return;
  try {
    const kept = await get<{ items: OutboxItem[]; ids: Record<string, string>; versions: Record<string, number>; needsSignIn?: boolean }>('state', store);
    versions = kept?.versions ?? {};
    // A write that was on its way when the page closed may or may not have arrived: send it again (same key).
    const items = (kept?.items ?? []).map((i) => (i.state === 'sending' ? { ...i, state: 'waiting' as const } : i));
    publish({ loaded: true, items, ids: kept?.ids ?? {}, needsSignIn: kept?.needsSignIn ?? false });
  } catch {
    publish({ loaded: true });
  }
})();

export function subscribeOutbox(cb: () => void) {
  listeners.add(cb);
  return () => listeners.delete(cb);
}
export const getOutbox = () => snapshot;

interface Hooks {
  currentUserId: () => string | null;
  /** After each answered write (the caller refreshes its queries). */
  onSent: (item: OutboxItem, result: unknown) => void;
  /** After the last waiting write has been answered. */
  onDrained: () => void;
}
let hooks: Hooks = { currentUserId: () => null, onSent: () => undefined, onDrained: () => undefined };
export function configureOutbox(h: Hooks) {
  hooks = h;
}

/** The server id for a client id once known (else the id itself). */
export const resolveId = (id: string) => snapshot.ids[id] ?? id;

/** Items of the signed-in user that still wait (for the header count and the screens). */
export function pendingFor(userId: string | null, items = snapshot.items) {
  return items.filter((i) => i.userId === userId);
}

export async function enqueue(item: Omit<OutboxItem, 'id' | 'seq' | 'createdAt' | 'state' | 'error' | 'attempts' | 'userId'> & { id?: string }, blob?: Blob) {
  await outboxReady;
  const userId = hooks.currentUserId();
  if (!userId) throw new Error('Sign in first');
  const id = item.id ?? uuid();
  if (blob && item.photo && store) await set(item.photo.blobKey, blob, store);
  const seq = (snapshot.items.at(-1)?.seq ?? 0) + 1;
  const full: OutboxItem = { ...item, id, seq, userId, createdAt: new Date().toISOString(), state: 'waiting', error: null, attempts: 0 };
  publish({ items: [...snapshot.items, full] });
  await save();
  kick();
  return full;
}

/** Changes a write that has not been sent yet (e.g. more entries on a span made offline). */
export async function amend(id: string, change: Partial<OutboxItem>) {
  publish({ items: snapshot.items.map((i) => (i.id === id && i.state !== 'sending' ? { ...i, ...change } : i)) });
  await save();
  kick();
}

/** The runner's own change of an item it is sending (amend leaves items on their way alone). */
async function settle(id: string, change: Partial<OutboxItem>) {
  publish({ items: snapshot.items.map((i) => (i.id === id ? { ...i, ...change } : i)) });
  await save();
}

export async function retryItem(id: string) {
  await amend(id, { state: 'waiting', error: null });
}

export async function discardItem(id: string) {
  const item = snapshot.items.find((i) => i.id === id);
  if (!item || item.state === 'sending') return;
  publish({ items: snapshot.items.filter((i) => i.id !== id) });
  if (item.photo && store) await del(item.photo.blobKey, store);
  await save();
  kick();
}

export async function photoBlob(item: OutboxItem): Promise<Blob | undefined> {
  return item.photo && store ? get<Blob>(item.photo.blobKey, store) : undefined;
}

/** After signing in again: the kept writes go out. */
export function signedInAgain() {
  if (!snapshot.needsSignIn) return kick();
  publish({ needsSignIn: false });
  void save();
  kick();
}

function swapIds<T>(value: T): T {
  if (typeof value === 'string') return (isLocalId(value) ? (snapshot.ids[value] ?? value) : value) as T;
  if (Array.isArray(value)) return value.map(swapIds) as T;
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, swapIds(v)])) as T;
  return value;
}
const swapUrl = (url: string) => url.replace(/local-[0-9a-f-]{36}/g, (m) => snapshot.ids[m] ?? m);

/** A write retried after a lost answer meets its own change as a "conflict": the saved record already says what it says. */
function alreadyApplied(body: Record<string, unknown>, current: Record<string, unknown>) {
  for (const [k, v] of Object.entries(body)) {
    if (k === 'version') continue;
    const c = current[k];
    if (k === 'hazards') {
      const mine = v as { kindId: string }[];
      const theirs = (c ?? []) as { kindId: string }[];
      if (mine.length !== theirs.length || mine.some((h, i) => h.kindId !== theirs[i]?.kindId)) return false;
    } else if (k === 'conductor') {
      const m = v as { codeWord?: string | null; diameterMm?: number | null } | null;
      const t = c as { codeWord?: string | null; diameterMm?: number | null } | null;
      if (!m !== !t) return false;
      if (m && t && (m.codeWord ?? null) !== (t.codeWord ?? null)) return false;
      if (m && t && m.diameterMm != null && Math.abs(m.diameterMm - (t.diameterMm ?? NaN)) > 1e-6) return false;
    } else if (typeof v === 'number' && typeof c === 'number') {
      if (Math.abs(v - c) > 1e-6) return false;
    } else if (k === 'loadCurrentA' && v === null) {
      if (current.loadCurrentSource !== 'line') return false;
    } else if ((v ?? null) !== (c ?? null)) return false;
  }
  return true;
}

function uploadWithKey(blob: Blob, item: OutboxItem, spanId: string | null): Promise<unknown> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    const body = new FormData();
    body.append('photo', blob, item.photo!.fileName);
    if (spanId) body.append('spanId', spanId);
    xhr.open('POST', '/api/photos');
    xhr.withCredentials = true;
    xhr.setRequestHeader('Idempotency-Key', item.id);
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) publish({ progress: { ...snapshot.progress, [item.id]: e.loaded / e.total } });
    };
    xhr.onload = () => {
      let data: unknown = null;
      try {
        data = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(data);
      const err = (data as ApiErrorBody | null)?.error;
      reject(new ApiError(xhr.status, err?.code ?? 'unknown', err?.message ?? `Upload failed (${xhr.status})`, err?.issues, data));
    };
    xhr.onerror = () => reject(new ApiError(0, 'network', 'No connection to the server'));
    xhr.send(body);
  });
}

async function send(item: OutboxItem): Promise<unknown> {
  if (item.kind === 'photo.upload') {
    const blob = await photoBlob(item);
    if (!blob) throw new ApiError(400, 'missing', 'The photo is no longer on this device');
    const spanId = item.photo!.spanId ? resolveId(item.photo!.spanId) : null;
    return uploadWithKey(blob, item, spanId);
  }
  let body = swapIds(item.body) as Record<string, unknown>;
  if (item.latestVersionOf) {
    const v = versions[resolveId(item.latestVersionOf)];
    if (v !== undefined) body = { ...body, version: v };
  }
  const headers: Record<string, string> = item.method === 'POST' ? { 'Idempotency-Key': item.id } : {};
  return api.send(item.method, swapUrl(item.url), body, headers);
}

let running = false;
let retryTimer: ReturnType<typeof setTimeout> | undefined;
let backoffMs = 2000;

/** Sends what waits, in order. Safe to call any time; does nothing offline, while signed out or while running. */
export function kick() {
  void run();
}

async function run() {
  await outboxReady;
  if (running || !deviceOnline() || snapshot.needsSignIn) return;
  const userId = hooks.currentUserId();
  if (!userId) return;
  running = true;
  let sentAny = false;
  try {
    for (;;) {
      const mine = snapshot.items.filter((i) => i.userId === userId);
      // A write waits while an earlier one on the same record is not through (failed, in conflict or waiting behind one).
      const blocked = new Set<string>();
      let next: OutboxItem | undefined;
      for (const i of mine) {
        const touches = i.touches.map(resolveId);
        if (i.state !== 'waiting' || touches.some((t) => blocked.has(t))) {
          touches.forEach((t) => blocked.add(t));
          if (i.clientId) blocked.add(i.clientId);
          continue;
        }
        next = i;
        break;
      }
      if (!next) break;
      const item = next;
      // A client id no waiting write will ever answer: its create was discarded.
      const refs = JSON.stringify([item.url, item.body, item.photo?.spanId ?? null]);
      const missing = (refs.match(/local-[0-9a-f-]{36}/g) ?? []).filter((id) => id !== item.clientId && !snapshot.ids[id] && !snapshot.items.some((o) => o.clientId === id));
      if (missing.length) {
        await settle(item.id, { state: 'failed', error: 'It belongs to a record that was discarded before it was sent.' });
        continue;
      }
      publish({ sending: true, items: snapshot.items.map((i) => (i.id === item.id ? { ...i, state: 'sending', attempts: i.attempts + 1 } : i)) });
      try {
        const result = (await send(item)) as { id?: string; version?: number } | undefined;
        const ids = item.clientId && result?.id ? { ...snapshot.ids, [item.clientId]: result.id } : snapshot.ids;
        if (result?.id && typeof result.version === 'number') versions[result.id] = result.version;
        const { [item.id]: _done, ...progress } = snapshot.progress;
        publish({ ids, progress, items: snapshot.items.filter((i) => i.id !== item.id) });
        await save();
        if (item.photo && store) await del(item.photo.blobKey, store);
        sentAny = true;
        backoffMs = 2000;
        hooks.onSent(item, result);
      } catch (err) {
        const { [item.id]: _p, ...progress } = snapshot.progress;
        publish({ progress });
        if (err instanceof ApiError && err.status === 401) {
          publish({ needsSignIn: true, items: snapshot.items.map((i) => (i.id === item.id ? { ...i, state: 'waiting' } : i)) });
          await save();
          break;
        }
        if (!(err instanceof ApiError) || err.status === 0 || err.status >= 500 || err.status === 429 || err.status === 408) {
          // No answer, or the server is busy: try again later, same key, nothing lost.
          await settle(item.id, { state: 'waiting', error: err instanceof ApiError && err.status !== 0 ? err.message : null });
          clearTimeout(retryTimer);
          retryTimer = setTimeout(() => {
            retryTimer = undefined;
            kick();
          }, backoffMs);
          backoffMs = Math.min(backoffMs * 2, 60_000);
          break;
        }
        const current = (err.body as { error?: { current?: unknown } } | null)?.error?.current as Record<string, unknown> | undefined;
        if (err.status === 409 && item.kind === 'span.update' && current) {
          if (alreadyApplied(swapIds(item.body) as Record<string, unknown>, current)) {
            versions[String(current.id)] = Number(current.version);
            publish({ items: snapshot.items.filter((i) => i.id !== item.id) });
            await save();
            sentAny = true;
            hooks.onSent(item, current);
            continue;
          }
          await settle(item.id, { state: 'conflict', current, error: 'The span was changed on the server after you started. Open it to choose what to keep.' });
          continue;
        }
        await settle(item.id, { state: 'failed', error: err.message });
      }
    }
  } finally {
    running = false;
    publish({ sending: false });
  }
  if (sentAny && !snapshot.items.some((i) => i.userId === userId && i.state === 'waiting')) hooks.onDrained();
}

if (typeof window !== 'undefined') {
  onlineManager.subscribe((online) => online && kick());
  window.addEventListener('focus', kick);
  setInterval(kick, 30_000);
}
