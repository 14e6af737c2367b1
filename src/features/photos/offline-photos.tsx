// Photos taken with no signal: the file is kept in IndexedDB with its position and time read on the device
// (exifr runs in the browser), shown with a "Waiting to send" badge, uploaded with its progress bar later.
import { useEffect, useState } from 'react';
import exifr from 'exifr';
import { ProgressBar } from '../../components/progress-bar.tsx';
import { WaitingBadge } from '../../components/waiting-badge.tsx';
import { deviceOnline, enqueue, getOutbox, isLocalId, newClientId, photoBlob, resolveId, type OutboxItem } from '../../lib/outbox.ts';
import { useOutbox } from '../../lib/use-outbox.ts';
import { formatBytes } from './format.ts';

/** Photos go to the outbox when offline, when the span exists only on this device, or when writes still wait. */
export function keepPhotoOffline(spanId: string | null, userId: string | null) {
  return !deviceOnline() || isLocalId(spanId) || getOutbox().items.some((i) => i.userId === userId && (i.state === 'waiting' || i.state === 'sending'));
}

/** Reads what the server will read too (GPS position, capture time as written), so the surveyor sees it at once. */
async function readExif(file: Blob): Promise<{ lat: number | null; lon: number | null; takenAt: string | null }> {
  try {
    const gps = await exifr.gps(file).catch(() => undefined);
    const tags = (await exifr.parse(file, { pick: ['DateTimeOriginal', 'OffsetTimeOriginal'], reviveValues: false }).catch(() => undefined)) as
      | { DateTimeOriginal?: string; OffsetTimeOriginal?: string }
      | undefined;
    // EXIF writes "YYYY:MM:DD HH:MM:SS"; shown as written, with its offset when the camera stored one.
    const t = tags?.DateTimeOriginal?.replace(/^(\d{4}):(\d{2}):(\d{2}) /, '$1-$2-$3T');
    return {
      lat: Number.isFinite(gps?.latitude) ? gps!.latitude : null,
      lon: Number.isFinite(gps?.longitude) ? gps!.longitude : null,
      takenAt: t ? `${t}${tags?.OffsetTimeOriginal ?? ''}` : null,
    };
  } catch {
    return { lat: null, lon: null, takenAt: null };
  }
}

export async function queuePhoto(file: File, spanId: string | null, spanWords: string | null, idempotencyKey = newClientId()) {
  const exif = await readExif(file);
  return enqueue(
    {
      id: idempotencyKey,
      kind: 'photo.upload',
      label: `Photo ${file.name || ''}${spanWords ? ` of span ${spanWords}` : ''}`.replace('  ', ' '),
      method: 'POST',
      url: '/api/photos',
      body: null,
      touches: spanId ? [spanId] : [],
      photo: { blobKey: `photo:${idempotencyKey}`, fileName: file.name || 'photo.jpg', size: file.size, type: file.type, spanId, ...exif },
    },
    file,
  );
}

function Thumb({ item }: { item: OutboxItem }) {
  const [url, setUrl] = useState<string | null>(null);
  useEffect(() => {
    let u: string | null = null;
    void photoBlob(item).then((b) => b && setUrl((u = URL.createObjectURL(b))));
    return () => {
      if (u) URL.revokeObjectURL(u);
    };
  }, [item]);
  return url ? (
    <img src={url} alt={`Photo ${item.photo?.fileName} kept on this device`} className="h-20 w-20 flex-none rounded object-cover" data-testid="offline-photo-thumb" />
  ) : (
    <div className="h-20 w-20 flex-none rounded bg-ink-50" />
  );
}

/** The photos of a span that wait on this device. */
export function OfflinePhotos({ spanId, userId }: { spanId: string | null; userId: string }) {
  const outbox = useOutbox();
  const items = outbox.items.filter((i) => i.userId === userId && i.kind === 'photo.upload' && spanId && i.photo?.spanId && resolveId(i.photo.spanId) === resolveId(spanId));
  if (!items.length) return null;
  return (
    <ul className="space-y-2" aria-label="Photos waiting to send">
      {items.map((item) => (
        <li key={item.id} className="flex items-start gap-3 rounded-lg border-2 border-dashed border-brass-300 bg-white p-3" data-testid="offline-photo" data-state={item.state}>
          <Thumb item={item} />
          <div className="min-w-0 flex-1 space-y-1">
            <p className="truncate text-sm font-semibold">
              {item.photo!.fileName} <span className="font-normal text-ink-500">· {formatBytes(item.photo!.size)}</span>
            </p>
            <WaitingBadge />
            <p className="text-xs text-ink-700" data-testid="offline-photo-exif">
              {item.photo!.lat != null && item.photo!.lon != null ? `Position from the photo: ${item.photo!.lat.toFixed(5)}°, ${item.photo!.lon.toFixed(5)}°` : 'The photo has no position; place it by hand once it is sent.'}
              {item.photo!.takenAt ? ` · taken ${item.photo!.takenAt.replace('T', ' ')}` : ''}
            </p>
            {item.state === 'sending' && <ProgressBar label={`Upload of ${item.photo!.fileName}`} value={outbox.progress[item.id] ?? 0} />}
            {item.error && <p className="field-error mt-0">{item.error}</p>}
          </div>
        </li>
      ))}
    </ul>
  );
}
