// The app's map on the shipped style that a tablet pans without tilting, with zoom buttons and a scale in the
// reader's units. It says when its first frame is drawn (data-map-ready, for the journeys) and hands the MapLibre
// map to the page for tests under `exposeAs`.
import '../lib/maplibre-setup.ts';
import { useRef, useState, type ReactNode, type RefObject } from 'react';
import MapView, { NavigationControl, ScaleControl, type MapLayerMouseEvent, type MapRef } from 'react-map-gl/maplibre';
import type { Map as MapLibreMap } from 'maplibre-gl';
import type { UnitSystem } from '#shared/units.ts';

export interface AppMapProps {
  system: UnitSystem;
  maxZoom: number;
  /** The frame's classes (height, border); the map fills it. */
  className: string;
  testId: string;
  /** window[exposeAs] is the MapLibre map once loaded (the journeys read it). */
  exposeAs: string;
  onLoad?: (map: MapLibreMap) => void;
  onClick?: (e: MapLayerMouseEvent) => void;
  interactiveLayerIds?: string[];
  cursor?: string;
  /** The page's own handle on the map, when it moves the camera itself. */
  mapRef?: RefObject<MapRef | null>;
  children?: ReactNode;
}

export function AppMap({ system, maxZoom, className, testId, exposeAs, onLoad, onClick, interactiveLayerIds, cursor, mapRef: pageRef, children }: AppMapProps) {
  const ownRef = useRef<MapRef>(null);
  const mapRef = pageRef ?? ownRef;
  const [ready, setReady] = useState(false);
  const loaded = () => {
    const m = mapRef.current?.getMap() as MapLibreMap | undefined;
    if (!m) return;
    (window as unknown as Record<string, MapLibreMap>)[exposeAs] = m;
    onLoad?.(m);
    m.once('idle', () => setReady(true));
  };
  return (
    <div className={`relative overflow-hidden ${className}`} data-testid={testId} data-map-ready={ready ? 'true' : 'false'}>
      <MapView
        ref={mapRef}
        mapStyle={`${location.origin}/map/style.json`}
        minZoom={7}
        maxZoom={maxZoom}
        dragRotate={false}
        pitchWithRotate={false}
        touchPitch={false}
        canvasContextAttributes={{ preserveDrawingBuffer: true }}
        interactiveLayerIds={interactiveLayerIds}
        cursor={cursor}
        onLoad={loaded}
        onClick={onClick}
        attributionControl={false}
        style={{ width: '100%', height: '100%' }}
      >
        <NavigationControl position="top-right" showCompass={false} />
        <ScaleControl position="bottom-left" unit={system === 'us' ? 'imperial' : 'metric'} />
        {children}
      </MapView>
    </div>
  );
}
