// A flight record on the app's map: the track, each stop numbered as in the table (perches in brass, hovers in
// chalk, a perch below half the prediction ringed in red) and the spans its perches matched. A stop opens its span.
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { Layer, Popup, Source, type MapLayerMouseEvent } from 'react-map-gl/maplibre';
import type { Map as MapLibreMap } from 'maplibre-gl';
import { AppMap } from '../../../components/app-map.tsx';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import type { FlightRecordView } from '../api.ts';
import { flightBounds, flightGeoJson, type StopProperties } from '../flight-map-data.ts';
import {
  FLIGHT_COLOURS,
  FLIGHT_LAYER_IDS,
  FLIGHT_SPANS_LAYER,
  FLIGHT_STOP_LABELS_LAYER,
  FLIGHT_STOPS_LAYER,
  FLIGHT_TRACK_CASING_LAYER,
  FLIGHT_TRACK_LAYER,
  LABELS_FROM,
  matchedSpansLayer,
} from '../flight-map-styles.ts';

export default function FlightMap({ record, system }: { record: FlightRecordView; system: UnitSystem }) {
  const [open, setOpen] = useState<{ lon: number; lat: number; p: StopProperties } | null>(null);
  const data = useMemo(() => flightGeoJson(record), [record]);
  const box = flightBounds(record);
  const matched = useMemo(() => matchedSpansLayer(data.matchedSpanIds), [data.matchedSpanIds]);

  const onLoad = (m: MapLibreMap) => {
    if (box) m.fitBounds([[box[0], box[1]], [box[2], box[3]]], { padding: 60, maxZoom: 17, duration: 0 });
  };
  const onClick = (e: MapLayerMouseEvent) => {
    const f = e.features?.find((x) => x.layer.id === FLIGHT_LAYER_IDS.stops);
    if (!f) return setOpen(null);
    // MapLibre hands properties back flattened (a null may come back as "null"): read the event itself.
    const ev = record.events.find((x) => x.id === (f.properties as StopProperties).eventId);
    if (!ev) return setOpen(null);
    const i = record.events.indexOf(ev);
    setOpen({ lon: ev.lon, lat: ev.lat, p: data.stops.features[i].properties });
  };
  const openEvent = open ? record.events.find((e) => e.id === open.p.eventId) : undefined;

  return (
    <div className="space-y-2">
      <AppMap
        system={system}
        maxZoom={19}
        className="h-[45vh] min-h-[320px] rounded-xl border border-ink-200"
        testId="flight-map"
        exposeAs="__roostlineFlightMap"
        interactiveLayerIds={[FLIGHT_LAYER_IDS.stops]}
        onLoad={onLoad}
        onClick={onClick}
      >
          <Layer {...FLIGHT_SPANS_LAYER} beforeId={LABELS_FROM} />
          <Layer {...matched} beforeId={LABELS_FROM} />
          <Source id="flight-track" type="geojson" data={data.track}>
            <Layer {...FLIGHT_TRACK_CASING_LAYER} />
            <Layer {...FLIGHT_TRACK_LAYER} />
          </Source>
          <Source id="flight-stops" type="geojson" data={data.stops}>
            <Layer {...FLIGHT_STOPS_LAYER} />
            <Layer {...FLIGHT_STOP_LABELS_LAYER} />
          </Source>
          {open && (
            <Popup longitude={open.lon} latitude={open.lat} anchor="bottom" offset={14} onClose={() => setOpen(null)} closeOnClick={false}>
              <div className="space-y-1 text-sm text-ink-900" data-testid="flight-stop-popup">
                <p className="font-bold">{open.p.label}</p>
                {open.p.spanId ? (
                  <p>
                    {formatQuantity(open.p.spanDistanceM, 'length', system)} from{' '}
                    <Link className="font-semibold underline" to={`/spans/${open.p.spanId}`}>span {openEvent?.spanLabel ?? ''}</Link>
                  </p>
                ) : (
                  <p>{openEvent?.note ?? 'No span matched'}</p>
                )}
                {openEvent?.measuredW != null && (
                  <p>
                    {formatQuantity(openEvent.measuredW, 'power', system)} measured{openEvent.predictedW != null && `, ${formatQuantity(openEvent.predictedW, 'power', system)} predicted`}
                    {openEvent.lowHarvest && <strong className="text-alarm"> · below half</strong>}
                  </p>
                )}
              </div>
            </Popup>
          )}
      </AppMap>
      <FlightMapLegend />
    </div>
  );
}

function Dot({ fill, stroke, width = 2 }: { fill: string; stroke: string; width?: number }) {
  return <span aria-hidden="true" className="inline-block h-4 w-4 rounded-full" style={{ background: fill, border: `${width}px solid ${stroke}` }} />;
}

export function FlightMapLegend() {
  return (
    <ul aria-label="Flight map legend" className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
      <li className="flex items-center gap-2"><span aria-hidden="true" className="inline-block h-1 w-8 rounded-full" style={{ background: FLIGHT_COLOURS.track }} />Track</li>
      <li className="flex items-center gap-2"><Dot fill={FLIGHT_COLOURS.perch} stroke={FLIGHT_COLOURS.outline} />Perch</li>
      <li className="flex items-center gap-2"><Dot fill={FLIGHT_COLOURS.perch} stroke={FLIGHT_COLOURS.low} width={3} />Perch below half the predicted harvest</li>
      <li className="flex items-center gap-2"><Dot fill={FLIGHT_COLOURS.hover} stroke={FLIGHT_COLOURS.outline} />Hover (no span or no harvest)</li>
      <li className="flex items-center gap-2"><span aria-hidden="true" className="inline-block h-1.5 w-8 rounded-full" style={{ background: FLIGHT_COLOURS.matched }} />Span a perch matched</li>
      <li className="flex items-center gap-2"><span aria-hidden="true" className="inline-block h-0.5 w-8 rounded-full" style={{ background: FLIGHT_COLOURS.span }} />Other approved spans</li>
    </ul>
  );
}
