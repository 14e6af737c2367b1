// The photos of one span: a grid of thumbnails and a full-size view in a dialog.
import { useEffect, useRef, useState } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useMe } from '../auth/queries.ts';
import { spanQueries } from '../spans/queries.ts';
import { photoApi } from './api.ts';
import { formatAltitude, formatBearing, formatBytes, formatPosition, formatTakenAt } from './format.ts';
import { photoQueries } from './queries.ts';
import type { Photo } from './types.ts';
import { PlaceOnMapButton } from './photo-uploader.tsx';

export function PhotoGallery({ spanId }: { spanId: string }) {
  const photos = useQuery(photoQueries.bySpan(spanId));
  const [open, setOpen] = useState<number | null>(null);
  if (photos.isPending) return <p className="text-sm text-ink-700">Loading photos…</p>;
  if (photos.error) return <p className="field-error" role="alert">Photos could not be loaded: {photos.error.message}</p>;
  const list = photos.data;
  if (!list.length) return <p className="text-sm text-ink-700" data-testid="photo-gallery-empty">No photos of this span yet.</p>;
  return (
    <div data-testid="photo-gallery">
      <ul className="grid grid-cols-[repeat(auto-fill,minmax(7rem,1fr))] gap-2" aria-label="Span photos">
        {list.map((p, i) => (
          <li key={p.id}>
            <button
              type="button"
              className="block w-full overflow-hidden rounded-lg border border-ink-100 bg-ink-50 focus:outline-2 focus:outline-brass-500"
              onClick={() => setOpen(i)}
              aria-label={`Open photo ${i + 1} of ${list.length}${p.takenAt ? `, taken ${formatTakenAt(p)}` : ''}`}
            >
              <img src={p.thumbnailUrl} alt="" loading="lazy" className="aspect-square w-full object-cover" />
            </button>
          </li>
        ))}
      </ul>
      {open !== null && list[open] && (
        <PhotoDialog
          photo={list[open]}
          index={open}
          count={list.length}
          onClose={() => setOpen(null)}
          onStep={(d) => setOpen((i) => (i === null ? i : (i + d + list.length) % list.length))}
          spanId={spanId}
        />
      )}
    </div>
  );
}

function PhotoDialog({
  photo,
  index,
  count,
  onClose,
  onStep,
  spanId,
}: {
  photo: Photo;
  index: number;
  count: number;
  onClose: () => void;
  onStep: (delta: number) => void;
  spanId: string;
}) {
  const me = useMe();
  const ref = useRef<HTMLDialogElement>(null);
  const queryClient = useQueryClient();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  useEffect(() => {
    const d = ref.current;
    // Not closed in a cleanup: unmounting removes it, and a close() there would fire onClose under StrictMode.
    if (d && !d.open) d.showModal();
  }, []);
  const canDelete = photo.uploaderId === me.id || me.roles.includes('admin');
  const canPlace = photo.lat === null && (me.roles.includes('surveyor') || me.roles.includes('safety'));
  const place = async (lat: number, lon: number) => {
    try {
      await photoApi.update(photo.id, { lat, lon });
      await queryClient.invalidateQueries({ queryKey: photoQueries.all() });
    } catch (err) {
      setError(err instanceof Error ? err.message : 'Could not place the photo');
    }
  };
  const altitude =
    photo.altitudeM === null
      ? null
      : photo.altitudeM < 0
        ? `${formatAltitude({ altitudeM: -photo.altitudeM }, me.unitSystem)} below sea level`
        : `${formatAltitude(photo, me.unitSystem)} above sea level`;
  const bearing = formatBearing(photo);
  const remove = async () => {
    if (!window.confirm('Delete this photo for everyone?')) return;
    setBusy(true);
    try {
      await photoApi.remove(photo.id);
      await queryClient.invalidateQueries({ queryKey: photoQueries.all() });
      void queryClient.invalidateQueries({ queryKey: spanQueries.detail(spanId).queryKey });
      onClose();
    } catch (err) {
      setError(err instanceof Error ? err.message : 'Could not delete the photo');
    } finally {
      setBusy(false);
    }
  };
  return (
    <dialog
      ref={ref}
      aria-label={`Photo ${index + 1} of ${count}`}
      data-testid="photo-dialog"
      className="m-auto max-h-[95vh] w-[min(96vw,1100px)] rounded-xl bg-white p-0 shadow-xl backdrop:bg-ink-900/70"
      onClose={onClose}
      onKeyDown={(e) => {
        if (e.key === 'ArrowRight') onStep(1);
        if (e.key === 'ArrowLeft') onStep(-1);
      }}
    >
      <div className="flex items-center justify-between gap-2 border-b border-ink-100 px-4 py-2">
        <p className="text-sm font-semibold text-ink-900">
          Photo {index + 1} of {count}
        </p>
        <div className="flex gap-2">
          {count > 1 && (
            <>
              <button type="button" className="btn-ghost min-h-10 px-3" onClick={() => onStep(-1)} aria-label="Previous photo">
                ‹
              </button>
              <button type="button" className="btn-ghost min-h-10 px-3" onClick={() => onStep(1)} aria-label="Next photo">
                ›
              </button>
            </>
          )}
          <button type="button" className="btn-primary min-h-10 px-3" onClick={onClose}>
            Close
          </button>
        </div>
      </div>
      <div className="bg-ink-900">
        <img key={photo.id} src={photo.displayUrl} alt={`Photo ${index + 1} of the span`} className="mx-auto max-h-[70vh] w-auto object-contain" />
      </div>
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 px-4 py-3 text-sm">
        <dt className="font-semibold text-ink-800">Taken</dt>
        <dd>{formatTakenAt(photo)}</dd>
        <dt className="font-semibold text-ink-800">Position</dt>
        <dd>
          {formatPosition(photo)}
          {photo.positionSource === 'manual' && ' (placed by hand)'}
          {canPlace && (
            <span className="ml-2">
              <PlaceOnMapButton spanId={spanId} onPlace={(lat, lon) => void place(lat, lon)} />
            </span>
          )}
        </dd>
        {altitude && (
          <>
            <dt className="font-semibold text-ink-800">Altitude</dt>
            <dd>{altitude}</dd>
          </>
        )}
        {bearing && (
          <>
            <dt className="font-semibold text-ink-800">Camera facing</dt>
            <dd>{bearing}</dd>
          </>
        )}
        <dt className="font-semibold text-ink-800">File</dt>
        <dd>
          {photo.width} × {photo.height} px · {formatBytes(photo.bytes)} ·{' '}
          <a className="font-semibold underline" href={photo.originalUrl} target="_blank" rel="noreferrer">
            Open original
          </a>
        </dd>
      </dl>
      {(canDelete || error) && (
        <div className="flex items-center justify-between gap-2 border-t border-ink-100 px-4 py-2">
          {error ? <p className="field-error mt-0" role="alert">{error}</p> : <span />}
          {canDelete && (
            <button type="button" className="btn-danger min-h-10 px-3" disabled={busy} onClick={() => void remove()}>
              Delete photo
            </button>
          )}
        </div>
      )}
    </dialog>
  );
}
