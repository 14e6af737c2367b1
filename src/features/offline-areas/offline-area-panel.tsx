// "Take an area offline" on the map: frame what the map shows or a box drawn with two taps, choose the zooms, read
// the estimated size, download with a progress bar; the saved areas of this tablet with their age and size, with
// refresh and delete (confirmed in place), and how much of the device's storage the app holds.
import { useCallback, useEffect, useRef, useState } from 'react';
import type { GeoJSONSource, Map as MapLibreMap, MapMouseEvent } from 'maplibre-gl';
import type { LonLatBox } from '#shared/tile-math.ts';
import { ProgressBar } from '../../components/progress-bar.tsx';
import { age, bytes, count, dateTime } from '../../lib/format.ts';
import { useOnline } from '../../lib/online.ts';
import {
  AREA_MAX_ZOOM,
  AREA_MIN_ZOOM,
  deleteArea,
  downloadArea,
  estimateArea,
  frameTiles,
  saveArea,
  savedAreas,
  storageFigures,
  tooManyMessage,
  type AreaEstimate,
  type BasemapZooms,
  type DownloadProgress,
  type RecordPlan,
  type SavedArea,
  type StorageFigures,
} from './areas.ts';

const FRAME_SOURCE = 'offline-frame';
const INK = '#12343b';
const BRASS = '#e8b04a';

/** What one can make out at a zoom, for choosing the range. */
const ZOOM_WORDS: Record<number, string> = {
  8: 'the whole region',
  10: 'lines and towns',
  12: 'spans',
  14: 'structures and roads',
  16: 'close up',
};
const zoomLabel = (z: number) => `${z}${ZOOM_WORDS[z] ? ` — ${ZOOM_WORDS[z]}` : ''}`;

function viewBox(map: MapLibreMap): LonLatBox {
  const b = map.getBounds();
  return [b.getWest(), b.getSouth(), b.getEast(), b.getNorth()];
}

function basemapZooms(map: MapLibreMap): BasemapZooms {
  const src = map.getStyle().sources.basemap as { minzoom?: number; maxzoom?: number } | undefined;
  return { minzoom: src?.minzoom ?? 0, maxzoom: src?.maxzoom ?? 14 };
}

/** Draws (or clears) the framed box on the map. */
function showFrame(map: MapLibreMap, box: LonLatBox | null) {
  const data = {
    type: 'FeatureCollection' as const,
    features: box
      ? [{ type: 'Feature' as const, properties: {}, geometry: { type: 'Polygon' as const, coordinates: [[[box[0], box[1]], [box[2], box[1]], [box[2], box[3]], [box[0], box[3]], [box[0], box[1]]]] } }]
      : [],
  };
  const src = map.getSource(FRAME_SOURCE) as GeoJSONSource | undefined;
  if (src) {
    src.setData(data);
    return;
  }
  if (!box) return;
  map.addSource(FRAME_SOURCE, { type: 'geojson', data });
  map.addLayer({ id: `${FRAME_SOURCE}-fill`, type: 'fill', source: FRAME_SOURCE, paint: { 'fill-color': BRASS, 'fill-opacity': 0.12 } });
  map.addLayer({ id: `${FRAME_SOURCE}-line`, type: 'line', source: FRAME_SOURCE, paint: { 'line-color': INK, 'line-width': 2, 'line-dasharray': [3, 2] } });
}

type Phase = { kind: 'closed' } | { kind: 'framing' } | { kind: 'downloading'; progress: DownloadProgress; name: string; refresh: boolean };

export function OfflineAreaPanel({ map, userId, plan, onDrawingChange }: { map: MapLibreMap; userId: string; plan: RecordPlan; onDrawingChange?: (drawing: boolean) => void }) {
  const online = useOnline();
  const [areas, setAreas] = useState<SavedArea[]>([]);
  const [storage, setStorage] = useState<StorageFigures | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: 'closed' });
  const [mode, setMode] = useState<'view' | 'box'>('view');
  const [view, setView] = useState<LonLatBox>(() => viewBox(map));
  const [drawn, setDrawn] = useState<LonLatBox | null>(null);
  const [corner, setCorner] = useState<[number, number] | null>(null);
  const [drawing, setDrawing] = useState(false);
  const startZoom = Math.max(AREA_MIN_ZOOM, Math.min(AREA_MAX_ZOOM, Math.floor(map.getZoom())));
  const [minZoom, setMinZoom] = useState(Math.max(AREA_MIN_ZOOM, startZoom - 2));
  const [maxZoom, setMaxZoom] = useState(Math.min(AREA_MAX_ZOOM, startZoom + 2));
  const [name, setName] = useState('');
  const [estimate, setEstimate] = useState<AreaEstimate | null>(null);
  const [estimating, setEstimating] = useState(false);
  const [estimateError, setEstimateError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [confirming, setConfirming] = useState<string | null>(null);
  const abort = useRef<AbortController | null>(null);

  const refreshStorage = useCallback(() => void storageFigures().then(setStorage), []);
  useEffect(() => {
    void savedAreas(userId).then(setAreas);
    refreshStorage();
  }, [userId, refreshStorage]);

  // The frame follows the map while "what the map shows" is chosen.
  useEffect(() => {
    const onMove = () => setView(viewBox(map));
    map.on('moveend', onMove);
    return () => void map.off('moveend', onMove);
  }, [map]);

  const frame: LonLatBox | null = mode === 'view' ? view : drawn;
  const framing = phase.kind === 'framing';
  useEffect(() => {
    showFrame(map, framing && mode === 'box' ? drawn : null);
  }, [map, framing, mode, drawn]);

  // Two taps draw the box: one corner, then the opposite one.
  useEffect(() => {
    onDrawingChange?.(drawing);
    if (!drawing) return;
    const onClick = (e: MapMouseEvent) => {
      const p: [number, number] = [e.lngLat.lng, e.lngLat.lat];
      setCorner((first) => {
        if (!first) return p;
        setDrawn([Math.min(first[0], p[0]), Math.min(first[1], p[1]), Math.max(first[0], p[0]), Math.max(first[1], p[1])]);
        setDrawing(false);
        return null;
      });
    };
    map.on('click', onClick);
    map.getCanvas().style.cursor = 'crosshair';
    return () => {
      map.off('click', onClick);
      map.getCanvas().style.cursor = '';
    };
  }, [map, drawing, onDrawingChange]);

  const frameKey = frame ? frame.map((v) => v.toFixed(5)).join(',') : '';
  const tilesNow = frame ? frameTiles(frame, minZoom, maxZoom) : null;

  // The estimate, measured again shortly after the frame or the zooms change.
  useEffect(() => {
    if (!framing || !frame || !online) return;
    const ctrl = new AbortController();
    setEstimateError(null);
    const timer = setTimeout(() => {
      setEstimating(true);
      estimateArea(frame, minZoom, maxZoom, basemapZooms(map), ctrl.signal)
        .then((e) => !ctrl.signal.aborted && setEstimate(e))
        .catch(() => !ctrl.signal.aborted && setEstimateError('The size could not be measured. Check the connection and try again.'))
        .finally(() => !ctrl.signal.aborted && setEstimating(false));
    }, 500);
    return () => {
      clearTimeout(timer);
      ctrl.abort();
    };
    // frameKey stands for the frame's value.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [framing, frameKey, minZoom, maxZoom, online, map]);

  const current = estimate && frame && estimate.minZoom === minZoom && estimate.maxZoom === maxZoom && estimate.bbox.map((v) => v.toFixed(5)).join(',') === frameKey ? estimate : null;

  const run = async (area: { id?: string; name: string; bbox: LonLatBox; minZoom: number; maxZoom: number }, refresh: boolean) => {
    const ctrl = new AbortController();
    abort.current = ctrl;
    setNotice(null);
    setPhase({ kind: 'downloading', progress: { done: 0, total: 0, bytes: 0 }, name: area.name, refresh });
    try {
      const saved = await downloadArea({ ...area, userId }, basemapZooms(map), plan, (progress) => setPhase({ kind: 'downloading', progress, name: area.name, refresh }), ctrl.signal);
      setAreas(await saveArea(saved));
      setNotice(
        `${refresh ? 'Refreshed' : 'Saved'} “${saved.name}”: ${count(saved.tiles)} tile places, ${count(saved.spans)} spans, ${count(saved.photos)} photos, ${bytes(saved.bytes)}.` +
          (saved.missed ? ` ${count(saved.missed)} items could not be fetched; refresh the area to try them again.` : ''),
      );
      setPhase({ kind: 'closed' });
      setDrawn(null);
      setName('');
    } catch (err) {
      setNotice(ctrl.signal.aborted ? 'Download stopped; nothing was saved as an area.' : 'The download failed. Check the connection and try again.');
      setPhase(refresh ? { kind: 'closed' } : { kind: 'framing' });
      void err;
    } finally {
      abort.current = null;
      refreshStorage();
    }
  };

  const onDelete = async (a: SavedArea) => {
    setAreas(await deleteArea(userId, a.id));
    setConfirming(null);
    setNotice(`Deleted “${a.name}” from this tablet.`);
    refreshStorage();
  };

  const field = 'field-input min-h-12 text-base';
  const downloading = phase.kind === 'downloading' ? phase : null;
  return (
    <section className="card space-y-3 p-3" aria-label="Offline areas" data-testid="offline-areas">
      <h2 className="text-base font-bold">Offline areas</h2>
      <p className="text-sm text-ink-700" data-testid="storage-use">
        {storage?.usage != null && storage.quota != null ? (
          <>
            Roostline holds <strong>{bytes(storage.usage)}</strong> of {bytes(storage.quota)} on this device.
          </>
        ) : (
          'This browser does not say how much storage it allows.'
        )}{' '}
        {storage?.persisted === true ? 'Saved areas stay until you delete them.' : storage?.persisted === false ? 'The browser may clear saved areas if the device runs short of space.' : null}
      </p>

      {phase.kind === 'closed' && (
        <button
          type="button"
          className="btn-primary min-h-12 w-full"
          disabled={!online}
          onClick={() => {
            // The zooms start around what the map shows now.
            const z = Math.max(AREA_MIN_ZOOM, Math.min(AREA_MAX_ZOOM, Math.floor(map.getZoom())));
            setMinZoom(Math.max(AREA_MIN_ZOOM, z - 1));
            setMaxZoom(Math.min(AREA_MAX_ZOOM, z + 2));
            setView(viewBox(map));
            setPhase({ kind: 'framing' });
          }}
        >
          Take an area offline
        </button>
      )}
      {!online && phase.kind === 'closed' && <p className="text-sm text-ink-700">Taking an area offline needs the network; saved areas work without it.</p>}

      {framing && (
        <div className="space-y-3" data-testid="area-framing">
          <fieldset>
            <legend className="field-label">Area</legend>
            <div className="grid grid-cols-2 gap-2">
              {(['view', 'box'] as const).map((m) => (
                <button
                  key={m}
                  type="button"
                  aria-pressed={mode === m}
                  className={`min-h-12 rounded-lg border-2 px-2 text-sm font-semibold ${mode === m ? 'border-ink-900 bg-ink-900 text-chalk' : 'border-ink-200 bg-white text-ink-900'}`}
                  onClick={() => {
                    setMode(m);
                    if (m === 'box' && !drawn) setDrawing(true);
                    if (m === 'view') setDrawing(false);
                  }}
                >
                  {m === 'view' ? 'What the map shows' : 'A box I draw'}
                </button>
              ))}
            </div>
            {mode === 'box' && (
              <div className="mt-2 space-y-2 text-sm">
                <p role="status">{drawing ? (corner ? 'Now tap the opposite corner.' : 'Tap one corner of the box on the map.') : drawn ? 'Box drawn.' : 'No box yet.'}</p>
                {!drawing && (
                  <button type="button" className="btn-ghost min-h-11 w-full" onClick={() => { setDrawn(null); setCorner(null); setDrawing(true); }}>
                    Draw the box again
                  </button>
                )}
              </div>
            )}
          </fieldset>
          <div className="grid gap-2">
            <div>
              <label className="field-label" htmlFor="area-min-zoom">From zoom</label>
              <select id="area-min-zoom" className={field} value={minZoom} onChange={(e) => { const v = Number(e.target.value); setMinZoom(v); if (v > maxZoom) setMaxZoom(v); }}>
                {Array.from({ length: AREA_MAX_ZOOM - AREA_MIN_ZOOM + 1 }, (_, i) => AREA_MIN_ZOOM + i).map((z) => (
                  <option key={z} value={z}>{zoomLabel(z)}</option>
                ))}
              </select>
            </div>
            <div>
              <label className="field-label" htmlFor="area-max-zoom">To zoom</label>
              <select id="area-max-zoom" className={field} value={maxZoom} onChange={(e) => { const v = Number(e.target.value); setMaxZoom(v); if (v < minZoom) setMinZoom(v); }}>
                {Array.from({ length: AREA_MAX_ZOOM - AREA_MIN_ZOOM + 1 }, (_, i) => AREA_MIN_ZOOM + i).map((z) => (
                  <option key={z} value={z}>{zoomLabel(z)}</option>
                ))}
              </select>
            </div>
          </div>
          <div>
            <label className="field-label" htmlFor="area-name">Name</label>
            <input id="area-name" className={field} value={name} maxLength={80} placeholder={`Area ${areas.length + 1}`} onChange={(e) => setName(e.target.value)} />
          </div>

          <div className="rounded-lg border border-ink-200 bg-chalk p-2 text-sm" data-testid="area-estimate" aria-live="polite">
            {!frame ? (
              <p>Draw the box to see what it holds.</p>
            ) : tilesNow?.tooMany ? (
              <p className="font-semibold text-alarm" role="alert">{tooManyMessage(tilesNow.tiles, minZoom, maxZoom)}</p>
            ) : estimateError ? (
              <p className="text-alarm">{estimateError}</p>
            ) : !current ? (
              <p>{estimating ? 'Measuring the size…' : 'Measuring the size shortly…'}</p>
            ) : (
              <EstimateTable e={current} />
            )}
          </div>

          <div className="grid grid-cols-2 gap-2">
            <button type="button" className="btn-ghost min-h-12" onClick={() => { setPhase({ kind: 'closed' }); setDrawing(false); setDrawn(null); }}>
              Cancel
            </button>
            <button
              type="button"
              className="btn-primary min-h-12"
              disabled={!current || current.tooMany || !online}
              onClick={() => frame && void run({ name: name.trim() || `Area ${areas.length + 1}`, bbox: frame, minZoom, maxZoom }, false)}
            >
              Download{current ? ` ${bytes(current.totalBytes)}` : ''}
            </button>
          </div>
        </div>
      )}

      {downloading && (
        <div className="space-y-2" data-testid="area-download">
          <ProgressBar
            label={`${downloading.refresh ? 'Refreshing' : 'Downloading'} “${downloading.name}”`}
            value={downloading.progress.total ? downloading.progress.done / downloading.progress.total : 0}
            detail={`${count(downloading.progress.done)} of ${count(downloading.progress.total)} · ${bytes(downloading.progress.bytes)}`}
          />
          <button type="button" className="btn-ghost min-h-11 w-full" onClick={() => abort.current?.abort()}>
            Stop
          </button>
        </div>
      )}

      {notice && <p role="status" className="text-sm font-semibold" data-testid="area-notice">{notice}</p>}

      {areas.length > 0 && (
        <ul className="space-y-2" aria-label="Saved areas">
          {areas.map((a) => (
            <li key={a.id} className="rounded-lg border border-ink-200 bg-white p-2 text-sm" data-testid="saved-area">
              <div className="flex items-baseline justify-between gap-2">
                <strong className="truncate">{a.name}</strong>
                <span className="shrink-0 text-ink-700">{bytes(a.bytes)}</span>
              </div>
              <p className="text-ink-700">
                <span title={dateTime(a.savedAt)}>Saved {age(a.savedAt)}</span> · zooms {a.minZoom}–{a.maxZoom} · {count(a.spans)} spans · {count(a.photos)} photos
                {a.missed ? ` · ${count(a.missed)} items missing` : ''}
              </p>
              {confirming === a.id ? (
                <div className="mt-2 space-y-2 rounded-lg border-2 border-alarm p-2" role="group" aria-label={`Delete ${a.name}?`}>
                  <p>Delete “{a.name}” from this tablet? Its tiles and thumbnails go; records kept elsewhere stay.</p>
                  <div className="grid grid-cols-2 gap-2">
                    <button type="button" className="btn-ghost min-h-11" onClick={() => setConfirming(null)}>Keep it</button>
                    <button type="button" className="btn-danger min-h-11" onClick={() => void onDelete(a)}>Delete area</button>
                  </div>
                </div>
              ) : (
                <div className="mt-2 grid grid-cols-3 gap-2">
                  <button type="button" className="btn-ghost min-h-11 px-1" onClick={() => map.fitBounds([[a.bbox[0], a.bbox[1]], [a.bbox[2], a.bbox[3]]], { padding: 20, duration: 400 })}>Show</button>
                  <button type="button" className="btn-ghost min-h-11 px-1" disabled={!online || !!downloading} onClick={() => void run(a, true)}>Refresh</button>
                  <button type="button" className="btn-ghost min-h-11 px-1" disabled={!!downloading} onClick={() => setConfirming(a.id)}>Delete</button>
                </div>
              )}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

function EstimateTable({ e }: { e: AreaEstimate }) {
  const c = e.contents!;
  return (
    <div className="space-y-2">
      <table className="w-full text-left">
        <caption className="sr-only">Tiles per zoom</caption>
        <thead>
          <tr className="text-ink-700">
            <th scope="col">Zoom</th>
            <th scope="col" className="text-right">Tiles</th>
            <th scope="col" className="text-right">Each</th>
            <th scope="col" className="text-right">Size</th>
          </tr>
        </thead>
        <tbody>
          {e.zooms.map((z) => (
            <tr key={z.z} data-zoom={z.z}>
              <td>{z.z}</td>
              <td className="text-right">{count(z.tiles)}</td>
              <td className="text-right">{bytes(z.basemapBytes + z.spanBytes)}</td>
              <td className="text-right">{bytes(z.tiles * (z.basemapBytes + z.spanBytes))}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p>
        {count(c.spans.length)} spans, {count(c.structures)} structures on {count(c.lineIds.length)} lines: {bytes(e.recordBytes)}. {count(c.photos.length)} photo thumbnails: {bytes(e.thumbnailBytes)}.
      </p>
      {c.truncated && <p className="text-alarm">More spans lie in this frame than one area keeps; draw a smaller box.</p>}
      <p className="font-semibold" data-testid="area-total">About {bytes(e.totalBytes)} for {count(e.tiles)} tile places.</p>
    </div>
  );
}
