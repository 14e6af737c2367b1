// Placing a photo without GPS by hand: click the map (spans and structures shown) or type the position.
import '../../lib/maplibre-setup.ts';
import { useEffect, useRef, useState } from 'react';
import MapView, { Layer, Marker, NavigationControl, type MapLayerMouseEvent } from 'react-map-gl/maplibre';
import { DEMO_CENTER } from '#shared/demo-region.ts';
import { SPANS_CASING_LAYER, STRUCTURES_LAYER, spanLineLayer } from '../map/map-styles.ts';

export interface LatLon {
  lat: number;
  lon: number;
}

export default function PhotoPlaceDialog({
  center,
  onPlace,
  onClose,
}: {
  /** Where the map opens, e.g. the middle of the span being surveyed. */
  center?: LatLon | null;
  onPlace: (at: LatLon) => void;
  onClose: () => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const [picked, setPicked] = useState<LatLon | null>(null);
  const [latText, setLatText] = useState('');
  const [lonText, setLonText] = useState('');
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
  }, []);
  const start = center ?? { lat: DEMO_CENTER[1], lon: DEMO_CENTER[0] };

  const pick = (at: LatLon) => {
    setPicked(at);
    setLatText(at.lat.toFixed(6));
    setLonText(at.lon.toFixed(6));
    setError(null);
  };
  const onMapClick = (e: MapLayerMouseEvent) => pick({ lat: e.lngLat.lat, lon: e.lngLat.lng });
  const typed = (): LatLon | null => {
    const lat = Number(latText);
    const lon = Number(lonText);
    if (latText.trim() === '' || lonText.trim() === '' || !Number.isFinite(lat) || !Number.isFinite(lon)) return null;
    if (Math.abs(lat) > 90 || Math.abs(lon) > 180) return null;
    return { lat, lon };
  };
  const confirm = () => {
    const at = typed();
    if (!at) return setError('Click the map, or enter a latitude (−90…90) and longitude (−180…180) in decimal degrees');
    onPlace(at);
  };

  return (
    <dialog
      ref={ref}
      aria-label="Place the photo on the map"
      data-testid="photo-place-dialog"
      className="m-auto w-[min(96vw,900px)] rounded-xl bg-white p-0 shadow-xl backdrop:bg-ink-900/70"
      onClose={onClose}
    >
      <div className="flex items-center justify-between gap-2 border-b border-ink-100 px-4 py-2">
        <p className="text-sm font-semibold text-ink-900">Click where the photo was taken</p>
        <button type="button" className="btn-ghost min-h-10 px-3" onClick={onClose}>
          Cancel
        </button>
      </div>
      <div className="h-[55vh] min-h-64" data-testid="photo-place-map">
        <MapView
          initialViewState={{ longitude: start.lon, latitude: start.lat, zoom: center ? 16 : 11 }}
          mapStyle={`${location.origin}/map/style.json`}
          onClick={onMapClick}
          cursor="crosshair"
          attributionControl={false}
          style={{ width: '100%', height: '100%' }}
        >
          <NavigationControl position="top-right" showCompass={false} />
          <Layer {...SPANS_CASING_LAYER} />
          <Layer {...spanLineLayer('status')} />
          <Layer {...STRUCTURES_LAYER} />
          {picked && <Marker longitude={picked.lon} latitude={picked.lat} color="#d9a441" />}
        </MapView>
      </div>
      <div className="flex flex-wrap items-end gap-3 px-4 py-3">
        <label className="text-sm">
          <span className="field-label">Latitude (°, south negative)</span>
          <input className="field-input" inputMode="decimal" value={latText} onChange={(e) => setLatText(e.target.value)} />
        </label>
        <label className="text-sm">
          <span className="field-label">Longitude (°, west negative)</span>
          <input className="field-input" inputMode="decimal" value={lonText} onChange={(e) => setLonText(e.target.value)} />
        </label>
        <button type="button" className="btn-primary min-h-11" onClick={confirm}>
          Place here
        </button>
        {error && (
          <p className="field-error w-full" role="alert">
            {error}
          </p>
        )}
      </div>
    </dialog>
  );
}
