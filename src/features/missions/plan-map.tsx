// The plan's map: the shipped basemap style with its zones, the base and target as draggable markers (a click
// places the next one), and the planned route with numbered perches.
import { useEffect, useMemo, useRef, useState } from 'react';
import { Layer, Marker, Source, type MapLayerMouseEvent, type MapRef } from 'react-map-gl/maplibre';
import { AppMap } from '../../components/app-map.tsx';
import type { UnitSystem } from '#shared/units.ts';
import { MISSION_ROUTE_CASING_LAYER, MISSION_ROUTE_LAYER, MISSION_ZONES_FILL_LAYER, MISSION_ZONES_OUTLINE_LAYER, LABELS_FROM } from './map-styles.ts';
import { bboxOf, routeGeoJson, type RouteStop } from './transforms.ts';
import type { LatLon } from './types.ts';

export type PlaceKind = 'base' | 'target';

export function PlanMap({
  base,
  target,
  stops,
  placing,
  onPlace,
  system,
  readOnly = false,
}: {
  base: LatLon | null;
  target: LatLon | null;
  stops: RouteStop[];
  /** What the next click on the map places. */
  placing: PlaceKind;
  onPlace: (kind: PlaceKind, at: LatLon) => void;
  system: UnitSystem;
  readOnly?: boolean;
}) {
  const mapRef = useRef<MapRef>(null);
  const [ready, setReady] = useState(false);
  const route = useMemo(() => routeGeoJson(stops), [stops]);
  const perches = stops.filter((s) => s.kind === 'perch');

  // Frame the route when a new plan arrives (and the markers when there is none yet).
  const frameKey = stops.map((s) => `${s.lat.toFixed(5)},${s.lon.toFixed(5)}`).join(';');
  useEffect(() => {
    const m = mapRef.current;
    if (!m || stops.length < 2) return;
    const box = bboxOf(stops);
    if (box) m.fitBounds([[box[0], box[1]], [box[2], box[3]]], { padding: 70, maxZoom: 15, duration: 0 });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [frameKey, ready]);

  const onLoad = () => setReady(true);
  const onClick = (e: MapLayerMouseEvent) => {
    if (readOnly) return;
    onPlace(placing, { lat: round6(e.lngLat.lat), lon: round6(e.lngLat.lng) });
  };

  return (
    <AppMap
      mapRef={mapRef}
      system={system}
      maxZoom={18}
      className="h-[55vh] min-h-[380px] rounded-xl border border-ink-200"
      testId="plan-map"
      exposeAs="__roostlinePlanMap"
      cursor={readOnly ? undefined : 'crosshair'}
      onLoad={onLoad}
      onClick={onClick}
    >
        <Layer {...MISSION_ZONES_FILL_LAYER} beforeId={LABELS_FROM} />
        <Layer {...MISSION_ZONES_OUTLINE_LAYER} beforeId={LABELS_FROM} />
        <Source id="mission-route" type="geojson" data={route}>
          <Layer {...MISSION_ROUTE_CASING_LAYER} />
          <Layer {...MISSION_ROUTE_LAYER} />
        </Source>
        {perches.map((p) => (
          <Marker key={`perch-${p.perchIndex}-${p.lat}-${p.lon}`} longitude={p.lon} latitude={p.lat} anchor="center">
            <span className="grid h-7 w-7 place-items-center rounded-full border-2 border-white bg-go text-sm font-bold text-white shadow" title={p.name} aria-label={p.name}>
              {(p.perchIndex ?? 0) + 1}
            </span>
          </Marker>
        ))}
        {base && (
          <Marker longitude={base.lon} latitude={base.lat} anchor="bottom" draggable={!readOnly} onDragEnd={(e) => onPlace('base', { lat: round6(e.lngLat.lat), lon: round6(e.lngLat.lng) })}>
            <Pin letter="B" label="Base" className="bg-ink-900 text-chalk" />
          </Marker>
        )}
        {target && (
          <Marker longitude={target.lon} latitude={target.lat} anchor="bottom" draggable={!readOnly} onDragEnd={(e) => onPlace('target', { lat: round6(e.lngLat.lat), lon: round6(e.lngLat.lng) })}>
            <Pin letter="T" label="Target" className="bg-brass-500 text-ink-900" />
          </Marker>
        )}
    </AppMap>
  );
}

function Pin({ letter, label, className }: { letter: string; label: string; className: string }) {
  return (
    <span className="flex flex-col items-center" title={`${label} (drag to move)`} aria-label={label} data-testid={`pin-${label.toLowerCase()}`}>
      <span className={`grid h-9 w-9 place-items-center rounded-full border-2 border-white text-base font-bold shadow-md ${className}`}>{letter}</span>
      <span className="h-2 w-0.5 bg-ink-900" />
    </span>
  );
}

const round6 = (x: number) => Math.round(x * 1e6) / 1e6;
