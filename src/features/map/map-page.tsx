// The map: the local basemap, spans from the server's tiles (by status or by score, width by harvest power),
// structures, photos and no-perch zones; filters shared with the spans table through the URL.
import '../../lib/maplibre-setup.ts';
import { useCallback, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { Link, useSearchParams } from 'react-router';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import MapView, { Layer, NavigationControl, ScaleControl, type MapLayerMouseEvent, type MapRef } from 'react-map-gl/maplibre';
import type { Map as MapLibreMap, VectorTileSource } from 'maplibre-gl';
import { Caution } from '../../components/caution.tsx';
import { useMe } from '../auth/queries.ts';
import { inventoryQueries } from '../spans/queries.ts';
import { SPAN_STATUSES, SPAN_STATUS_LOOK } from '../spans/status.ts';
import { mapApi, type ZoneProperties } from './api.ts';
import { mapFiltersFromSearch, searchWithMapFilters, spanFilterExpression, spansTableLink, type MapFilters } from './map-filters.ts';
import {
  LAYER_IDS,
  PHOTOS_LAYER,
  SPANS_CASING_LAYER,
  SPANS_SELECTED_LAYER,
  STRUCTURES_LAYER,
  ZONES_FILL_LAYER,
  ZONES_OUTLINE_LAYER,
  spanLineLayer,
  type OverlayLayer,
} from './map-styles.ts';
import { MapLegend } from './legend.tsx';
import { SpanCard } from './span-card.tsx';
import { ZonePanel } from './zone-tools.tsx';

/**
 * Absolute, unencoded template (the worker resolves it and `{z}` must stay literal). Status and line go to the
 * server, which applies them before generalising low zooms; thresholds are filtered on the client at once.
 */
function spanTileUrl(f: Pick<MapFilters, 'status' | 'lineId'>, harvesterProfileId?: string, droneProfileId?: string) {
  const q = new URLSearchParams();
  if (f.status) q.set('status', f.status);
  if (f.lineId) q.set('lineId', f.lineId);
  if (harvesterProfileId && droneProfileId) {
    q.set('harvesterProfileId', harvesterProfileId);
    q.set('droneProfileId', droneProfileId);
  }
  const s = q.toString();
  return `${location.origin}/api/tiles/spans/{z}/{x}/{y}.mvt${s ? `?${s}` : ''}`;
}

/** The first label layer of /map/style.json (server/modules/map/style.ts). */
const LABELS_FROM = 'road-label';

function withFilter(layer: OverlayLayer, filter: unknown[]): OverlayLayer {
  return { ...layer, filter } as unknown as OverlayLayer;
}

/** What the app adds beside the map: the offline-areas panel (src/app/offline-area-slot.tsx). */
export type MapAreaSlot = (ctx: { map: MapLibreMap; onDrawingChange: (drawing: boolean) => void }) => ReactNode;

export function MapPage({ areaSlot }: { areaSlot?: MapAreaSlot } = {}) {
  const me = useMe();
  const canEditZones = me.roles.includes('safety');
  const [params, setParams] = useSearchParams();
  const filters = useMemo(() => mapFiltersFromSearch(params), [params]);
  const setFilters = (patch: Partial<MapFilters>) => setParams(searchWithMapFilters(params, { ...filters, ...patch }), { replace: true });
  const queryClient = useQueryClient();
  const mapRef = useRef<MapRef>(null);
  const [map, setMap] = useState<MapLibreMap | null>(null);
  const [ready, setReady] = useState(false);
  const [selectedSpanId, setSelectedSpanId] = useState<string | null>(null);
  const [selectedZone, setSelectedZone] = useState<ZoneProperties | null>(null);
  const [editingZones, setEditingZones] = useState(false);
  const [drawingArea, setDrawingArea] = useState(false);
  const [fitMessage, setFitMessage] = useState<string | null>(null);

  const lines = useQuery(inventoryQueries.lines());
  const harvesters = useQuery({ queryKey: ['profiles', 'harvesters'], queryFn: async () => (await mapApi.harvesters()).items, staleTime: 5 * 60_000 });
  const drones = useQuery({ queryKey: ['profiles', 'drones'], queryFn: async () => (await mapApi.drones()).items, staleTime: 5 * 60_000 });
  const defaultDroneId = drones.data?.find((d) => d.active)?.id;
  const harvesterId = filters.harvesterProfileId && harvesters.data?.some((h) => h.id === filters.harvesterProfileId) ? filters.harvesterProfileId : undefined;
  const bounds = useQuery({
    queryKey: ['map', 'span-bounds', filters.status, filters.lineId, filters.minHarvestW, filters.minScore, harvesterId, defaultDroneId],
    queryFn: () => mapApi.spanBounds({ ...filters, harvesterProfileId: harvesterId }, defaultDroneId),
  });

  // Status, line and harvester change which spans and which harvest power the tiles carry.
  const tileUrl = spanTileUrl(filters, harvesterId, harvesterId ? defaultDroneId : undefined);
  const appliedTileUrl = useRef<string | null>(null);
  useEffect(() => {
    const source = map?.getSource('spans') as VectorTileSource | undefined;
    if (!source) return;
    if (appliedTileUrl.current === null && tileUrl === spanTileUrl({})) {
      appliedTileUrl.current = tileUrl;
      return;
    }
    if (appliedTileUrl.current !== tileUrl) {
      appliedTileUrl.current = tileUrl;
      source.setTiles([tileUrl]);
    }
  }, [map, tileUrl]);

  const filterExpr = useMemo(() => spanFilterExpression(filters), [filters]);
  const lineLayer = useMemo(() => spanLineLayer(filters.colourBy), [filters.colourBy]);

  const fitToResults = useCallback(async () => {
    const result = bounds.data ?? (await bounds.refetch()).data;
    if (!result || !result.bbox) {
      setFitMessage('No span matches these filters.');
      return;
    }
    setFitMessage(`${result.count} span${result.count === 1 ? '' : 's'} in view.`);
    const [w, s, e, n] = result.bbox;
    mapRef.current?.fitBounds([[w, s], [e, n]], { padding: 60, maxZoom: 16, duration: 600 });
  }, [bounds]);

  const onLoad = () => {
    const m = mapRef.current?.getMap() ?? null;
    setMap(m);
    if (m) {
      (window as unknown as { __roostlineMap?: MapLibreMap }).__roostlineMap = m;
      // The style opens on the basemap's own region (its centre and zoom); keep the view near its box.
      const bbox = (m.getStyle().metadata as Record<string, unknown> | undefined)?.['roostline:bbox'] as number[] | undefined;
      if (bbox?.length === 4) m.setMaxBounds([bbox[0] - 1, bbox[1] - 1, bbox[2] + 1, bbox[3] + 1]);
      // 'idle': the style, every visible tile and every transition are done (a test's "map ready").
      m.once('idle', () => setReady(true));
    }
  };

  const onClick = (e: MapLayerMouseEvent) => {
    if (editingZones || drawingArea) return;
    const features = e.features ?? [];
    const span = features.find((f) => f.layer.id === LAYER_IDS.spansLine);
    if (span) {
      setSelectedSpanId(String(span.properties?.id));
      setSelectedZone(null);
      return;
    }
    const zone = features.find((f) => f.layer.id === LAYER_IDS.zonesFill);
    if (zone) {
      const p = zone.properties as Record<string, unknown>;
      setSelectedZone({
        id: String(p.id),
        name: String(p.name),
        reason: String(p.reason),
        severity: p.severity === 'caution' ? 'caution' : 'exclude',
        validFrom: (p.validFrom as string) || null,
        validTo: (p.validTo as string) || null,
        active: p.active === true || p.active === 'true',
        version: Number(p.version),
        createdAt: String(p.createdAt),
        updatedAt: String(p.updatedAt),
      });
      setSelectedSpanId(null);
      return;
    }
    setSelectedSpanId(null);
    setSelectedZone(null);
  };

  const onZonesChanged = () => {
    void queryClient.invalidateQueries({ queryKey: ['zones'] });
    void queryClient.invalidateQueries({ queryKey: ['spans'] });
    setSelectedZone(null);
  };

  const field = 'field-input min-h-12 text-base';
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 className="page-title">Map</h1>
        <Link to={spansTableLink(filters)} className="btn-ghost min-h-12">
          Same filters in the spans table
        </Link>
      </div>
      <Caution compact />
      <div className="grid gap-3 md:grid-cols-[17rem_1fr] lg:grid-cols-[20rem_1fr]">
        <aside className="space-y-3" aria-label="Map controls">
          <section className="card space-y-3 p-3" aria-label="Filters">
            <div>
              <label className="field-label" htmlFor="map-status">Status</label>
              <select id="map-status" className={field} value={filters.status ?? ''} onChange={(e) => setFilters({ status: (e.target.value || undefined) as MapFilters['status'] })}>
                <option value="">Any status</option>
                {SPAN_STATUSES.map((s) => (
                  <option key={s} value={s}>
                    {SPAN_STATUS_LOOK[s].label}
                  </option>
                ))}
              </select>
            </div>
            <div>
              <label className="field-label" htmlFor="map-line">Line</label>
              <select id="map-line" className={field} value={filters.lineId ?? ''} onChange={(e) => setFilters({ lineId: e.target.value || undefined })}>
                <option value="">Every line</option>
                {(lines.data ?? []).map((l) => (
                  <option key={l.id} value={l.id}>
                    {l.name}
                  </option>
                ))}
              </select>
            </div>
            <div>
              <label className="field-label" htmlFor="map-harvester">Harvester</label>
              <select id="map-harvester" className={field} value={harvesterId ?? ''} onChange={(e) => setFilters({ harvesterProfileId: e.target.value || undefined })}>
                <option value="">Default harvester</option>
                {(harvesters.data ?? [])
                  .filter((h) => h.active)
                  .map((h) => (
                    <option key={h.id} value={h.id}>
                      {h.name}
                    </option>
                  ))}
              </select>
            </div>
            <div className="grid grid-cols-2 gap-2">
              <div>
                <label className="field-label" htmlFor="map-min-harvest">Min. harvest (W)</label>
                <input
                  id="map-min-harvest"
                  className={field}
                  type="number"
                  inputMode="decimal"
                  min={0}
                  step="0.5"
                  value={filters.minHarvestW ?? ''}
                  onChange={(e) => setFilters({ minHarvestW: e.target.value === '' ? undefined : Math.max(0, Number(e.target.value)) })}
                />
              </div>
              <div>
                <label className="field-label" htmlFor="map-min-score">Min. score</label>
                <input
                  id="map-min-score"
                  className={field}
                  type="number"
                  inputMode="numeric"
                  min={0}
                  max={100}
                  step="5"
                  value={filters.minScore ?? ''}
                  onChange={(e) => setFilters({ minScore: e.target.value === '' ? undefined : Math.min(100, Math.max(0, Number(e.target.value))) })}
                />
              </div>
            </div>
            <fieldset>
              <legend className="field-label">Colour spans by</legend>
              <div className="grid grid-cols-2 gap-2">
                {(['status', 'score'] as const).map((c) => (
                  <button
                    key={c}
                    type="button"
                    aria-pressed={filters.colourBy === c}
                    className={`min-h-12 rounded-lg border-2 font-semibold ${filters.colourBy === c ? 'border-ink-900 bg-ink-900 text-chalk' : 'border-ink-200 bg-white text-ink-900'}`}
                    onClick={() => setFilters({ colourBy: c })}
                  >
                    {c === 'status' ? 'Status' : 'Score'}
                  </button>
                ))}
              </div>
            </fieldset>
            <button type="button" className="btn-primary min-h-12 w-full" onClick={fitToResults} disabled={!map}>
              Fit to results{bounds.data ? ` (${bounds.data.count})` : ''}
            </button>
            {fitMessage && (
              <p className="text-sm text-ink-700" role="status">
                {fitMessage}
              </p>
            )}
          </section>
          {map && (
            <ZonePanel
              map={map}
              canEdit={canEditZones}
              selected={selectedZone}
              onClose={() => setSelectedZone(null)}
              onChanged={onZonesChanged}
              onEditingChange={setEditingZones}
            />
          )}
          {map && areaSlot?.({ map, onDrawingChange: setDrawingArea })}
          <MapLegend colourBy={filters.colourBy} />
        </aside>
        <div className="relative h-[70vh] min-h-[420px] overflow-hidden rounded-xl border border-ink-200 md:sticky md:top-2 md:h-[calc(100vh-13rem)]" data-testid="map" data-map-ready={ready ? 'true' : 'false'}>
          <MapView
            ref={mapRef}
            mapStyle={`${location.origin}/map/style.json`}
            minZoom={8}
            maxZoom={18}
            dragRotate={false}
            pitchWithRotate={false}
            touchPitch={false}
            canvasContextAttributes={{ preserveDrawingBuffer: true }}
            interactiveLayerIds={editingZones || drawingArea ? [] : [LAYER_IDS.spansLine, LAYER_IDS.zonesFill]}
            cursor={editingZones || drawingArea ? 'crosshair' : undefined}
            onLoad={onLoad}
            onClick={onClick}
            attributionControl={false}
            style={{ width: '100%', height: '100%' }}
          >
            <NavigationControl position="top-right" showCompass={false} />
            <ScaleControl position="bottom-left" unit={me.unitSystem === 'us' ? 'imperial' : 'metric'} />
            {/* Overlays go under the basemap's labels, so place and road names stay readable. */}
            <Layer {...ZONES_FILL_LAYER} beforeId={LABELS_FROM} />
            <Layer {...ZONES_OUTLINE_LAYER} beforeId={LABELS_FROM} />
            <Layer {...withFilter(SPANS_CASING_LAYER, filterExpr)} beforeId={LABELS_FROM} />
            <Layer {...withFilter(lineLayer, filterExpr)} beforeId={LABELS_FROM} />
            <Layer {...withFilter(SPANS_SELECTED_LAYER, ['==', ['get', 'id'], selectedSpanId ?? ''])} beforeId={LABELS_FROM} />
            <Layer {...withFilter(STRUCTURES_LAYER, filters.lineId ? ['==', ['get', 'lineId'], filters.lineId] : ['all'])} beforeId={LABELS_FROM} />
            <Layer {...PHOTOS_LAYER} beforeId={LABELS_FROM} />
          </MapView>
          {selectedSpanId && (
            <div className="absolute bottom-3 left-3 right-3 z-10 sm:right-auto sm:w-96">
              <SpanCard spanId={selectedSpanId} onClose={() => setSelectedSpanId(null)} />
            </div>
          )}
        </div>
      </div>
    </div>
  );
}

/** The route module's component (loaded lazily with the map library as its own chunk). */
export const Component = MapPage;
