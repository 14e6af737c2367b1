// What the photos feature renders in the span pages' photo slots (wired in src/app/router.tsx).
import type { ReactNode } from 'react';
import type { Span } from '#shared/schemas/inventory.ts';
import { useMe } from '../auth/queries.ts';
import { PhotoGallery } from './photo-gallery.tsx';
import { PhotoUploader } from './photo-uploader.tsx';
import { OfflinePhotos } from './offline-photos.tsx';
import { isLocalId } from '../../lib/outbox.ts';

/** Span form: take or pick photos (they join the span once it is saved), then the span's photos so far. */
export function spanFormPhotoSlot(ctx: { spanId: string | null; hazardIds: string[] }): ReactNode {
  return <SpanFormPhotos spanId={ctx.spanId} />;
}

function SpanFormPhotos({ spanId }: { spanId: string | null }) {
  const me = useMe();
  const ctx = { spanId };
  return (
    <>
      <PhotoUploader spanId={ctx.spanId} />
      <OfflinePhotos spanId={ctx.spanId} userId={me.id} />
      {ctx.spanId && !isLocalId(ctx.spanId) && (
        <div className="space-y-2">
          <h3 className="text-sm font-semibold text-ink-800">Photos of this span</h3>
          <PhotoGallery spanId={ctx.spanId} />
        </div>
      )}
    </>
  );
}

function SpanDetailPhotos({ span }: { span: Span }) {
  const me = useMe();
  const mayUpload = me.roles.includes('surveyor') || me.roles.includes('safety');
  return (
    <>
      <PhotoGallery spanId={span.id} />
      {mayUpload && (
        <details className="rounded-lg border border-ink-100 p-3">
          <summary className="cursor-pointer text-sm font-semibold text-ink-900">Add photos</summary>
          <div className="mt-3">
            <PhotoUploader spanId={span.id} />
          </div>
        </details>
      )}
    </>
  );
}

/** Span detail page: the gallery with its full-size view; surveyors and safety officers may add photos. */
export function spanDetailPhotosSlot(span: Span): ReactNode {
  return <SpanDetailPhotos span={span} />;
}
