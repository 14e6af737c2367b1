// Field uploader: camera or gallery, one upload per file with its own progress bar, retry, then the
// thumbnail and the spans within 60 m for the surveyor to confirm.
import { lazy, Suspense, useCallback, useEffect, useId, useRef, useState } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { formatQuantity } from '#shared/units.ts';
import { ApiError } from '../../lib/api.ts';
import { holdPage } from '../../lib/page-work.ts';
import { useMe } from '../auth/queries.ts';
import { inventoryQueries, spanQueries } from '../spans/queries.ts';
import { photoApi, uploadPhoto, type UploadHandle } from './api.ts';
import { formatBytes, formatPosition, formatTakenAt } from './format.ts';
import { photoQueries } from './queries.ts';
import { MAX_UPLOAD_BYTES, type PhotoWithSuggestions } from './types.ts';
import { newClientId } from '../../lib/outbox.ts';
import { keepPhotoOffline, queuePhoto } from './offline-photos.tsx';

// The map (and maplibre) loads only when someone places a photo by hand.
const PhotoPlaceDialog = lazy(() => import('./photo-place-dialog.tsx'));

/** `held`: picked before the span's first save; kept here and uploaded (with the span) right after that save. */
type Status = 'held' | 'queued' | 'uploading' | 'processing' | 'done' | 'failed';

interface Item {
  key: string;
  file: File;
  status: Status;
  progress: number;
  error: string | null;
  retryable: boolean;
  photo: PhotoWithSuggestions | null;
  /** The surveyor chose a link by hand: the auto-link on first save leaves it alone. */
  linkChosen: boolean;
}

/** Uploads running at once; the rest wait their turn (field connections are thin). */
const PARALLEL = 2;
let seq = 0;

const retryableStatus = (err: unknown) => !(err instanceof ApiError) || err.status === 0 || err.status >= 500 || err.status === 401 || err.status === 429;

export function PhotoUploader({ spanId = null, onUploaded }: { spanId?: string | null; onUploaded?: (photo: PhotoWithSuggestions) => void }) {
  const [items, setItems] = useState<Item[]>([]);
  const me = useMe();
  const handles = useRef(new Map<string, UploadHandle>());
  const queryClient = useQueryClient();
  const cameraId = useId();
  const pickId = useId();
  const spanRef = useRef(spanId);
  spanRef.current = spanId;
  const onUploadedRef = useRef(onUploaded);
  onUploadedRef.current = onUploaded;

  const patch = useCallback((key: string, change: Partial<Item>) => {
    setItems((all) => all.map((i) => (i.key === key ? { ...i, ...change } : i)));
  }, []);

  // Each upload that follows a first save holds the page (the form waits for it before leaving). A failed one
  // stays held, so the form learns of it even when the refusal comes before the save's own answer, until the
  // surveyor tries it again or removes it.
  const waiters = useRef(new Map<string, (ok: boolean) => void>());
  const failedHolds = useRef(new Map<string, () => void>());
  const forgets = useRef(new Map<string, () => void>());
  const hold = useCallback((key: string) => {
    if (waiters.current.has(key)) return;
    const work = new Promise<boolean>((resolve) => waiters.current.set(key, resolve));
    forgets.current.set(key, holdPage(work));
  }, []);
  const release = useCallback((key: string, ok = true) => {
    const resolve = waiters.current.get(key);
    if (!resolve) return;
    waiters.current.delete(key);
    const forget = forgets.current.get(key);
    forgets.current.delete(key);
    if (!ok && forget) failedHolds.current.set(key, forget);
    resolve(ok);
  }, []);
  const forgetFailure = useCallback((key: string) => {
    failedHolds.current.get(key)?.();
    failedHolds.current.delete(key);
  }, []);

  const refresh = useCallback(() => {
    void queryClient.invalidateQueries({ queryKey: photoQueries.all() });
    if (spanRef.current) void queryClient.invalidateQueries({ queryKey: spanQueries.detail(spanRef.current).queryKey });
  }, [queryClient]);

  const start = useCallback(
    (item: Item) => {
      const key = newClientId();
      // No signal (or the span exists only on this device): the photo waits in the outbox, listed below.
      const keep = () =>
        queuePhoto(item.file, spanRef.current, null, key)
          .then(
            () => setItems((all) => all.filter((i) => i.key !== item.key)),
            (err: unknown) => patch(item.key, { status: 'failed', error: err instanceof Error ? err.message : 'Could not keep the photo', retryable: true }),
          )
          .finally(() => release(item.key));
      if (keepPhotoOffline(spanRef.current, me.id)) {
        patch(item.key, { status: 'uploading', progress: 0, error: null });
        void keep();
        return;
      }
      patch(item.key, { status: 'uploading', progress: 0, error: null });
      const handle = uploadPhoto(item.file, {
        spanId: spanRef.current,
        idempotencyKey: key,
        onProgress: (f) => patch(item.key, f >= 1 ? { progress: 1, status: 'processing' } : { progress: f }),
      });
      handles.current.set(item.key, handle);
      handle.promise.then(
        (photo) => {
          handles.current.delete(item.key);
          patch(item.key, { status: 'done', progress: 1, photo });
          refresh();
          onUploadedRef.current?.(photo);
          release(item.key);
        },
        (err: unknown) => {
          handles.current.delete(item.key);
          // The connection dropped mid-upload: the same key goes in the outbox, so the server keeps it once.
          if (err instanceof ApiError && err.status === 0) return void keep();
          patch(item.key, { status: 'failed', error: err instanceof Error ? err.message : 'Upload failed', retryable: retryableStatus(err) });
          release(item.key, false);
        },
      );
    },
    [patch, refresh, release, me.id],
  );

  // Start queued uploads while fewer than PARALLEL are running.
  useEffect(() => {
    const running = items.filter((i) => i.status === 'uploading' || i.status === 'processing').length;
    const next = items.filter((i) => i.status === 'queued').slice(0, Math.max(0, PARALLEL - running));
    for (const item of next) start(item);
  }, [items, start]);

  useEffect(() => {
    const map = handles.current;
    const held = waiters.current;
    const failed = failedHolds.current;
    return () => {
      map.forEach((h) => h.abort());
      held.forEach((resolve) => resolve(true));
      failed.forEach((forget) => forget());
    };
  }, []);

  // Photos picked before a new span was first saved upload as soon as it has an id, straight onto it.
  useEffect(() => {
    if (!spanId || !items.some((i) => i.status === 'held')) return;
    setItems((all) => all.map((i) => (i.status === 'held' ? { ...i, status: 'queued' } : i)));
  }, [spanId, items]);

  // A photo uploaded without a span (e.g. before this change) joins it once it has an id.
  useEffect(() => {
    if (!spanId || spanId.startsWith('local-')) return;
    for (const item of items) {
      if (item.status === 'done' && item.photo && !item.photo.spanId && !item.linkChosen) {
        patch(item.key, { linkChosen: true });
        photoApi.update(item.photo.id, { spanId }).then(
          (photo) => {
            patch(item.key, { photo });
            refresh();
          },
          () => patch(item.key, { linkChosen: false }),
        );
      }
    }
  }, [spanId, items, patch, refresh]);

  const add = (list: FileList | null) => {
    if (!list?.length) return;
    const added: Item[] = Array.from(list).map((file) => {
      const tooBig = file.size > MAX_UPLOAD_BYTES;
      return {
        key: `u${++seq}`,
        file,
        status: tooBig ? 'failed' : spanRef.current ? 'queued' : 'held',
        progress: 0,
        error: tooBig ? `${formatBytes(file.size)} is over the ${formatBytes(MAX_UPLOAD_BYTES)} limit` : null,
        retryable: false,
        photo: null,
        linkChosen: false,
      };
    });
    // A held photo holds the page from the moment it is picked, so a first save that submits waits for its upload.
    for (const i of added) if (i.status === 'held') hold(i.key);
    setItems((all) => [...all, ...added]);
  };

  const link = async (key: string, photoId: string, target: string | null) => {
    patch(key, { linkChosen: true });
    try {
      patch(key, { photo: await photoApi.update(photoId, { spanId: target }), error: null });
      refresh();
    } catch (err) {
      patch(key, { error: err instanceof Error ? err.message : 'Could not link the photo' });
    }
  };

  const setHazard = async (key: string, photoId: string, hazardId: string | null) => {
    try {
      patch(key, { photo: await photoApi.update(photoId, { hazardId }), error: null });
      refresh();
    } catch (err) {
      patch(key, { error: err instanceof Error ? err.message : 'Could not link the hazard' });
    }
  };

  const place = async (key: string, photoId: string, lat: number, lon: number) => {
    try {
      patch(key, { photo: await photoApi.update(photoId, { lat, lon }), error: null });
      refresh();
    } catch (err) {
      patch(key, { error: err instanceof Error ? err.message : 'Could not place the photo' });
    }
  };

  return (
    <div className="space-y-3" data-testid="photo-uploader">
      <div className="flex flex-wrap gap-2">
        <label htmlFor={cameraId} className="btn-accent min-h-12 cursor-pointer">
          Take photos
        </label>
        <input
          id={cameraId}
          data-testid="photo-input"
          type="file"
          accept="image/*"
          capture="environment"
          multiple
          className="sr-only"
          onChange={(e) => {
            add(e.currentTarget.files);
            e.currentTarget.value = '';
          }}
        />
        <label htmlFor={pickId} className="btn-ghost min-h-12 cursor-pointer">
          Choose from device
        </label>
        <input
          id={pickId}
          type="file"
          accept="image/jpeg,image/png,image/webp,image/avif"
          multiple
          className="sr-only"
          onChange={(e) => {
            add(e.currentTarget.files);
            e.currentTarget.value = '';
          }}
        />
      </div>
      <p className="text-sm text-ink-700">
        JPEG, PNG, WebP or AVIF up to {formatBytes(MAX_UPLOAD_BYTES)} each. The position, direction and time are read from the photo.
        {!spanId && ' Photos added before the span is first saved stay on this device and upload as soon as you save it.'}
      </p>
      {items.length > 0 && (
        <ul className="space-y-2" aria-label="Photo uploads">
          {items.map((item) => (
            <UploadRow
              key={item.key}
              item={item}
              spanId={spanId}
              onRetry={() => {
                forgetFailure(item.key);
                patch(item.key, { status: 'queued', progress: 0, error: null });
              }}
              onRemove={() => {
                handles.current.get(item.key)?.abort();
                release(item.key);
                forgetFailure(item.key);
                setItems((all) => all.filter((i) => i.key !== item.key));
              }}
              onLink={(target) => item.photo && void link(item.key, item.photo.id, target)}
              onPlace={(lat, lon) => item.photo && void place(item.key, item.photo.id, lat, lon)}
              onHazard={(hazardId) => item.photo && void setHazard(item.key, item.photo.id, hazardId)}
            />
          ))}
        </ul>
      )}
    </div>
  );
}

function UploadRow({
  item,
  spanId,
  onRetry,
  onRemove,
  onLink,
  onPlace,
  onHazard,
}: {
  item: Item;
  spanId: string | null;
  onRetry: () => void;
  onRemove: () => void;
  onLink: (spanId: string | null) => void;
  onPlace: (lat: number, lon: number) => void;
  onHazard: (hazardId: string | null) => void;
}) {
  const pct = Math.round(item.progress * 100);
  const photo = item.photo;
  return (
    <li className="rounded-lg border border-ink-100 bg-white p-3" data-testid="photo-upload-row" data-status={item.status}>
      <div className="flex items-start gap-3">
        {photo ? (
          <img
            src={photo.thumbnailUrl}
            alt={`Uploaded photo ${item.file.name}`}
            data-testid="photo-thumbnail"
            className="h-20 w-20 flex-none rounded object-cover"
            width={80}
            height={80}
          />
        ) : (
          <div className="flex h-20 w-20 flex-none items-center justify-center rounded bg-ink-50 text-xs text-ink-500">{item.status === 'failed' ? 'Not sent' : 'Photo'}</div>
        )}
        <div className="min-w-0 flex-1 space-y-1">
          <p className="truncate text-sm font-semibold text-ink-900">
            {item.file.name || 'Photo'} <span className="font-normal text-ink-500">· {formatBytes(item.file.size)}</span>
          </p>
          {item.status === 'held' && (
            <p className="text-sm font-semibold text-ink-800" data-testid="photo-held">
              Kept on this device; it uploads as soon as the span is saved.
            </p>
          )}
          {(item.status === 'uploading' || item.status === 'processing' || item.status === 'queued') && (
            <>
              <div
                role="progressbar"
                aria-label={`Upload of ${item.file.name || 'photo'}`}
                aria-valuemin={0}
                aria-valuemax={100}
                aria-valuenow={pct}
                data-testid="photo-progress"
                className="h-3 w-full overflow-hidden rounded-full bg-ink-100"
              >
                <div className="h-3 rounded-full bg-brass-500 transition-[width]" style={{ width: `${pct}%` }} />
              </div>
              <p className="text-xs text-ink-700" aria-live="polite">
                {item.status === 'queued' ? 'Waiting…' : item.status === 'processing' ? 'Sent; reading position and making previews…' : `Uploading… ${pct}%`}
              </p>
            </>
          )}
          {item.status === 'failed' && (
            <p className="field-error mt-0" role="alert">
              {item.error}
            </p>
          )}
          {photo && <PhotoFacts photo={photo} />}
          {photo && item.error && <p className="field-error mt-0">{item.error}</p>}
          {photo && <LinkChoices photo={photo} spanId={spanId} onLink={onLink} onPlace={onPlace} />}
          {photo && <HazardPicker photo={photo} onChange={onHazard} />}
        </div>
        <div className="flex flex-none flex-col gap-1">
          {item.status === 'failed' && item.retryable && (
            <button type="button" className="btn-primary min-h-10 px-3 text-sm" onClick={onRetry}>
              Try again
            </button>
          )}
          {item.status !== 'done' && (
            <button type="button" className="btn-ghost min-h-10 px-3 text-sm" onClick={onRemove}>
              {item.status === 'uploading' || item.status === 'queued' ? 'Cancel' : 'Remove'}
            </button>
          )}
        </div>
      </div>
    </li>
  );
}

function PhotoFacts({ photo }: { photo: PhotoWithSuggestions }) {
  return (
    <p className="text-xs text-ink-700">
      {formatPosition(photo)}
      {photo.positionSource === 'manual' && ' (placed by hand)'} · {formatTakenAt(photo)}
    </p>
  );
}

/** The middle of a span (between its structures), to open the placing map there. */
export function useSpanMidpoint(spanId: string | null): { lat: number; lon: number } | null {
  const span = useQuery({ ...spanQueries.detail(spanId ?? ''), enabled: !!spanId });
  const structures = useQuery(inventoryQueries.structures(span.data?.lineId ?? ''));
  const a = structures.data?.find((s) => s.id === span.data?.fromStructureId);
  const b = structures.data?.find((s) => s.id === span.data?.toStructureId);
  return a && b ? { lat: (a.lat + b.lat) / 2, lon: (a.lon + b.lon) / 2 } : null;
}

/** "Place on the map" for a photo without position; the dialog is loaded on first use. */
export function PlaceOnMapButton({ spanId, onPlace }: { spanId: string | null; onPlace: (lat: number, lon: number) => void }) {
  const [open, setOpen] = useState(false);
  const center = useSpanMidpoint(open ? spanId : null);
  return (
    <>
      <button type="button" className="btn-ghost min-h-10 px-2 text-xs" onClick={() => setOpen(true)}>
        Place on the map
      </button>
      {open && (
        <Suspense fallback={<span className="text-xs text-ink-700">Loading the map…</span>}>
          <PhotoPlaceDialog
            key={center ? 'span' : 'region'}
            center={center}
            onClose={() => setOpen(false)}
            onPlace={(at) => {
              setOpen(false);
              onPlace(at.lat, at.lon);
            }}
          />
        </Suspense>
      )}
    </>
  );
}

/** Which of the span's hazards the photo shows (none by default). */
export function HazardPicker({ photo, onChange }: { photo: { spanId: string | null; hazardId: string | null }; onChange: (hazardId: string | null) => void }) {
  const span = useQuery({ ...spanQueries.detail(photo.spanId ?? ''), enabled: !!photo.spanId });
  const kinds = useQuery(inventoryQueries.hazardKinds());
  const id = useId();
  const hazards = span.data?.hazards ?? [];
  if (!photo.spanId || !hazards.length) return null;
  const label = (kindId: string) => kinds.data?.find((k) => k.id === kindId)?.label ?? kindId;
  return (
    <div className="flex flex-wrap items-center gap-2">
      <label htmlFor={id} className="text-xs font-semibold text-ink-800">
        Shows hazard
      </label>
      <select id={id} className="field-input min-h-10 w-auto py-1 text-sm" value={photo.hazardId ?? ''} onChange={(e) => onChange(e.target.value || null)}>
        <option value="">None in particular</option>
        {hazards.map((h) => (
          <option key={h.id} value={h.id}>
            {label(h.kindId)} ({h.severity}){h.note ? ` — ${h.note.slice(0, 40)}` : ''}
          </option>
        ))}
      </select>
    </div>
  );
}

export function SpanName({ id }: { id: string }) {
  const span = useQuery(spanQueries.detail(id));
  if (!span.data) return <span>span {id.slice(0, 6)}…</span>;
  return (
    <span>
      {span.data.lineName}: {span.data.fromStructureLabel} → {span.data.toStructureLabel}
    </span>
  );
}

function LinkChoices({
  photo,
  spanId,
  onLink,
  onPlace,
}: {
  photo: PhotoWithSuggestions;
  spanId: string | null;
  onLink: (spanId: string | null) => void;
  onPlace: (lat: number, lon: number) => void;
}) {
  const [locating, setLocating] = useState<string | null>(null);
  const system = useMe().unitSystem;
  const others = photo.suggestions.filter((s) => s.spanId !== photo.spanId);
  const useHere = () => {
    if (!('geolocation' in navigator)) return setLocating('This device cannot tell its position');
    setLocating('Finding your position…');
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        setLocating(null);
        onPlace(pos.coords.latitude, pos.coords.longitude);
      },
      (err) => setLocating(`No position: ${err.message}`),
      { enableHighAccuracy: true, timeout: 20_000 },
    );
  };
  return (
    <div className="space-y-1 text-sm" data-testid="photo-links">
      {photo.spanId ? (
        <p className="font-semibold text-go">
          Linked to {photo.spanId === spanId ? 'this span' : <SpanName id={photo.spanId} />}
        </p>
      ) : (
        <p className="text-ink-700">Not linked to a span yet.</p>
      )}
      {others.length > 0 && (
        <div className="space-y-1">
          <p className="text-xs font-semibold text-ink-800">{photo.spanId ? 'Also near:' : `Spans within ${formatQuantity(60, 'length', system, { digits: 0 })} — confirm one:`}</p>
          <ul className="flex flex-wrap gap-1" aria-label="Suggested spans">
            {others.map((s) => (
              <li key={s.spanId}>
                <button type="button" className="btn-ghost min-h-10 px-2 text-xs" onClick={() => onLink(s.spanId)}>
                  {s.spanId === spanId ? 'This span' : <SpanName id={s.spanId} />} · {formatQuantity(s.distanceM, 'length', system, { digits: 0 })}
                </button>
              </li>
            ))}
          </ul>
        </div>
      )}
      {!photo.spanId && spanId && !others.some((s) => s.spanId === spanId) && (
        <button type="button" className="btn-ghost min-h-10 px-2 text-xs" onClick={() => onLink(spanId)}>
          Link to this span
        </button>
      )}
      {photo.lat === null && (
        <div className="flex flex-wrap items-center gap-2">
          <span className="text-xs text-ink-700">No GPS in this file.</span>
          <PlaceOnMapButton spanId={spanId} onPlace={onPlace} />
          <button type="button" className="btn-ghost min-h-10 px-2 text-xs" onClick={useHere}>
            Use my current position
          </button>
          {locating && <span className="text-xs text-ink-700">{locating}</span>}
        </div>
      )}
    </div>
  );
}
