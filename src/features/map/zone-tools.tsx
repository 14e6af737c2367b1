// No-perch zones on the map: safety officers draw, reshape and delete polygons (terra-draw with its MapLibre
// adapter) and fill in name, reason, severity and validity; every role can read a zone's details.
import { useEffect, useRef, useState } from 'react';
import type { Map as MapLibreMap, GeoJSONSource } from 'maplibre-gl';
import type { Polygon } from 'geojson';
import { TerraDraw, TerraDrawPolygonMode, TerraDrawSelectMode } from 'terra-draw';
import { TerraDrawMapLibreGLAdapter } from 'terra-draw-maplibre-gl-adapter';
import { ApiError } from '../../lib/api.ts';
import { date } from '../../lib/format.ts';
import { Caution } from '../../components/caution.tsx';
import { mapApi, type ZoneProperties } from './api.ts';
import { ZONE_COLOURS } from './map-styles.ts';

type EditorState =
  | { kind: 'idle' }
  | { kind: 'drawing' }
  | { kind: 'form'; featureId: string | number; zone: ZoneProperties | null }
  | { kind: 'reshape'; featureId: string | number; zone: ZoneProperties };

interface FormValues {
  name: string;
  reason: string;
  severity: 'exclude' | 'caution';
  validFrom: string;
  validTo: string;
}

const EMPTY: FormValues = { name: '', reason: '', severity: 'exclude', validFrom: '', validTo: '' };

/** Re-reads the zones source of the map (after a change). */
// Drawing handles in Roostline's palette (src/index.css): a brass shape with an ink outline, chalk vertices ringed
// in ink (large enough for a finger on the tablet), brass midpoints, instead of the drawing library's stock look.
const INK = '#12343b';
const BRASS = '#e8b04a';
const BRASS_DARK = '#c98f28';
const CHALK = '#f7f4ee';
const ZONE_DRAW_POLYGON_STYLES = {
  fillColor: BRASS, fillOpacity: 0.25, outlineColor: INK, outlineWidth: 2,
  closingPointColor: CHALK, closingPointWidth: 7, closingPointOutlineColor: INK, closingPointOutlineWidth: 2,
  coordinatePointColor: CHALK, coordinatePointWidth: 6, coordinatePointOutlineColor: INK, coordinatePointOutlineWidth: 2,
  editedPointColor: BRASS, editedPointWidth: 7, editedPointOutlineColor: INK, editedPointOutlineWidth: 2,
  snappingPointColor: BRASS_DARK, snappingPointWidth: 6, snappingPointOutlineColor: INK, snappingPointOutlineWidth: 2,
} as const;
const ZONE_DRAW_SELECT_STYLES = {
  selectedPolygonColor: BRASS, selectedPolygonFillOpacity: 0.3, selectedPolygonOutlineColor: INK, selectedPolygonOutlineWidth: 3,
  selectionPointColor: CHALK, selectionPointWidth: 7, selectionPointOutlineColor: INK, selectionPointOutlineWidth: 2,
  midPointColor: BRASS, midPointWidth: 5, midPointOutlineColor: INK, midPointOutlineWidth: 1,
} as const;

export function reloadZones(map: MapLibreMap) {
  const source = map.getSource('zones') as GeoJSONSource | undefined;
  source?.setData(`${location.origin}/api/zones`);
}

function ZoneDetails({ zone }: { zone: ZoneProperties }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
      <dt className="text-ink-700">Severity</dt>
      <dd className="font-semibold" style={{ color: zone.severity === 'exclude' ? ZONE_COLOURS.exclude : '#9c6b17' }}>
        {zone.severity === 'exclude' ? 'Exclude — no perching' : 'Caution — perch with care'}
      </dd>
      <dt className="text-ink-700">Reason</dt>
      <dd>{zone.reason}</dd>
      <dt className="text-ink-700">Valid</dt>
      <dd>
        {zone.validFrom ? date(zone.validFrom) : 'always'} → {zone.validTo ? date(zone.validTo) : 'open-ended'} {zone.active ? '' : '(not in force today)'}
      </dd>
    </dl>
  );
}

export function ZonePanel({
  map,
  canEdit,
  selected,
  onClose,
  onChanged,
  onEditingChange,
}: {
  map: MapLibreMap;
  canEdit: boolean;
  selected: ZoneProperties | null;
  onClose: () => void;
  onChanged: () => void;
  /** True while the editor owns the map's clicks (drawing or reshaping). */
  onEditingChange: (editing: boolean) => void;
}) {
  const drawRef = useRef<TerraDraw | null>(null);
  const [state, setState] = useState<EditorState>({ kind: 'idle' });
  const [error, setError] = useState<ApiError | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    if (!canEdit) return;
    const draw = new TerraDraw({
      adapter: new TerraDrawMapLibreGLAdapter({ map }),
      modes: [
        new TerraDrawPolygonMode({ styles: ZONE_DRAW_POLYGON_STYLES }),
        new TerraDrawSelectMode({
          styles: ZONE_DRAW_SELECT_STYLES,
          flags: { polygon: { feature: { draggable: true, coordinates: { midpoints: true, draggable: true, deletable: true } } } },
        }),
      ],
    });
    draw.start();
    draw.on('finish', (id, context) => {
      if (context.mode === 'polygon' && context.action === 'draw') {
        draw.setMode('select');
        draw.selectFeature(id);
        setState({ kind: 'form', featureId: id, zone: null });
      }
    });
    drawRef.current = draw;
    return () => {
      drawRef.current = null;
      try {
        draw.stop();
      } catch {
        /* the map may already be gone */
      }
    };
  }, [map, canEdit]);

  useEffect(() => {
    onEditingChange(state.kind !== 'idle');
  }, [state.kind, onEditingChange]);

  const reset = () => {
    const draw = drawRef.current;
    if (draw) {
      draw.clear();
      draw.setMode('static');
    }
    setState({ kind: 'idle' });
    setError(null);
  };

  const startDrawing = () => {
    reset();
    onClose();
    drawRef.current?.setMode('polygon');
    setState({ kind: 'drawing' });
  };

  const startReshape = (zone: ZoneProperties, geometry: Polygon) => {
    const draw = drawRef.current;
    if (!draw) return;
    draw.clear();
    draw.setMode('select');
    const [result] = draw.addFeatures([{ type: 'Feature', geometry, properties: { mode: 'polygon' } }]);
    if (!result?.valid) {
      setError(new ApiError(400, 'bad_request', 'This zone cannot be reshaped on the map: its polygon is not drawable here.'));
      return;
    }
    draw.selectFeature(result.id!);
    setState({ kind: 'reshape', featureId: result.id!, zone });
  };

  const currentGeometry = (id: string | number): Polygon | null => {
    const f = drawRef.current?.getSnapshotFeature(id);
    return f && f.geometry.type === 'Polygon' ? (f.geometry as Polygon) : null;
  };

  const save = async (values: FormValues = EMPTY) => {
    if (state.kind !== 'form' && state.kind !== 'reshape') return;
    setBusy(true);
    setError(null);
    try {
      if (state.kind === 'form') {
        const geometry = currentGeometry(state.featureId);
        if (!geometry) throw new ApiError(400, 'bad_request', 'Draw the zone on the map first');
        await mapApi.createZone({ name: values.name, reason: values.reason, severity: values.severity, geometry, validFrom: values.validFrom || null, validTo: values.validTo || null });
      } else {
        const geometry = currentGeometry(state.featureId);
        if (!geometry) throw new ApiError(400, 'bad_request', 'The reshaped polygon was lost; start again');
        await mapApi.updateZone(state.zone.id, { version: state.zone.version, geometry });
      }
      reset();
      reloadZones(map);
      onChanged();
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError(0, 'network', 'Could not reach the server; your drawing is kept, try again'));
    } finally {
      setBusy(false);
    }
  };

  const saveDetails = async (zone: ZoneProperties, v: FormValues) => {
    setBusy(true);
    setError(null);
    try {
      await mapApi.updateZone(zone.id, { version: zone.version, name: v.name, reason: v.reason, severity: v.severity, validFrom: v.validFrom || null, validTo: v.validTo || null });
      reloadZones(map);
      onChanged();
      onClose();
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError(0, 'network', 'Could not reach the server; try again'));
    } finally {
      setBusy(false);
    }
  };

  const remove = async (zone: ZoneProperties) => {
    if (!window.confirm(`Delete the zone "${zone.name}"? Spans inside it will be rescored.`)) return;
    setBusy(true);
    try {
      await mapApi.deleteZone(zone.id, zone.version);
      reloadZones(map);
      onChanged();
      onClose();
    } catch (err) {
      setError(err instanceof ApiError ? err : new ApiError(0, 'network', 'Could not reach the server; try again'));
    } finally {
      setBusy(false);
    }
  };

  const geometryIssue = error?.issues.find((i) => i.path.startsWith('geometry'))?.message;

  return (
    <section aria-label="No-perch zones" className="space-y-3">
      {canEdit && state.kind === 'idle' && (
        <button type="button" className="btn-accent min-h-12 w-full" onClick={startDrawing}>
          Draw a no-perch zone
        </button>
      )}
      {state.kind === 'drawing' && (
        <div className="rounded-lg border border-brass-300 bg-brass-100 p-3 text-sm">
          <p className="font-semibold">Tap the corners of the zone on the map; tap the first corner again to close it.</p>
          <button type="button" className="btn-ghost mt-2 min-h-12 w-full" onClick={reset}>
            Stop drawing
          </button>
        </div>
      )}
      {state.kind === 'form' && (
        <div className="card space-y-2 p-3">
          <h2 className="text-lg font-bold">New no-perch zone</h2>
          <p className="text-sm text-ink-700">Drag the corners to adjust the shape, then describe the zone.</p>
          <ZoneForm initial={EMPTY} submitLabel="Save zone" busy={busy} error={error} onSubmit={(v) => save(v)} onCancel={reset} />
        </div>
      )}
      {state.kind === 'reshape' && (
        <div className="card space-y-2 p-3">
          <h2 className="text-lg font-bold">Reshape “{state.zone.name}”</h2>
          <p className="text-sm text-ink-700">Drag corners or the midpoints between them; then save the new shape.</p>
          {error && (
            <p role="alert" className="rounded-lg border border-red-300 bg-red-50 p-2 text-sm font-semibold text-alarm">
              {geometryIssue ? `The polygon was refused: ${geometryIssue}` : error.message}
            </p>
          )}
          <div className="flex gap-2">
            <button type="button" className="btn-primary min-h-12 flex-1" disabled={busy} onClick={() => save()}>
              Save shape
            </button>
            <button type="button" className="btn-ghost min-h-12" onClick={reset}>
              Cancel
            </button>
          </div>
        </div>
      )}
      {state.kind === 'idle' && selected && (
        <SelectedZone
          key={`${selected.id}:${selected.version}`}
          zone={selected}
          canEdit={canEdit}
          busy={busy}
          error={error}
          onClose={onClose}
          onReshape={(geometry) => startReshape(selected, geometry)}
          onDelete={() => remove(selected)}
          onSave={(v) => saveDetails(selected, v)}
        />
      )}
    </section>
  );
}

function SelectedZone({
  zone,
  canEdit,
  busy,
  error,
  onClose,
  onReshape,
  onDelete,
  onSave,
}: {
  zone: ZoneProperties;
  canEdit: boolean;
  busy: boolean;
  error: ApiError | null;
  onClose: () => void;
  onReshape: (g: Polygon) => void;
  onDelete: () => void;
  onSave: (v: FormValues) => void;
}) {
  const [editing, setEditing] = useState(false);
  return (
    <div className="card space-y-3 p-3" data-testid="zone-card">
      <div className="flex items-start justify-between gap-2">
        <h2 className="text-lg font-bold">{zone.name}</h2>
        <button type="button" className="btn-ghost min-h-10 px-3" aria-label="Close zone details" onClick={onClose}>
          ✕
        </button>
      </div>
      {editing ? (
        <ZoneForm
          initial={{ name: zone.name, reason: zone.reason, severity: zone.severity, validFrom: zone.validFrom ?? '', validTo: zone.validTo ?? '' }}
          submitLabel="Save details"
          busy={busy}
          error={error}
          onSubmit={onSave}
          onCancel={() => setEditing(false)}
        />
      ) : (
        <>
          <ZoneDetails zone={zone} />
          <Caution compact />
          {error && (
            <p role="alert" className="rounded-lg border border-red-300 bg-red-50 p-2 text-sm font-semibold text-alarm">
              {error.message}
            </p>
          )}
          {canEdit && (
            <div className="grid grid-cols-3 gap-2">
              <button type="button" className="btn-ghost min-h-12" onClick={() => setEditing(true)}>
                Edit details
              </button>
              <button
                type="button"
                className="btn-ghost min-h-12"
                onClick={async () => {
                  const g = await fetchZoneGeometry(zone.id);
                  if (g) onReshape(g);
                }}
              >
                Reshape
              </button>
              <button type="button" className="btn-danger min-h-12" disabled={busy} onClick={onDelete}>
                Delete
              </button>
            </div>
          )}
        </>
      )}
    </div>
  );
}

function ZoneForm({
  initial,
  submitLabel,
  busy,
  error,
  onSubmit,
  onCancel,
}: {
  initial: FormValues;
  submitLabel: string;
  busy: boolean;
  error: ApiError | null;
  onSubmit: (v: FormValues) => void;
  onCancel: () => void;
}) {
  const [values, setValues] = useState<FormValues>(initial);
  const issue = (path: string) => error?.issues.find((i) => i.path === path || i.path.startsWith(`${path}.`))?.message;
  const geometryIssue = issue('geometry');
  return (
    <form
      aria-label="Zone details"
      className="space-y-3"
      onSubmit={(e) => {
        e.preventDefault();
        onSubmit(values);
      }}
    >
      <div>
        <label className="field-label" htmlFor="zone-name">Name</label>
        <input id="zone-name" className="field-input" value={values.name} onChange={(e) => setValues({ ...values, name: e.target.value })} aria-invalid={!!issue('name')} />
        {issue('name') && <p className="field-error">{issue('name')}</p>}
      </div>
      <div>
        <label className="field-label" htmlFor="zone-reason">Reason</label>
        <textarea id="zone-reason" rows={2} className="field-input" value={values.reason} onChange={(e) => setValues({ ...values, reason: e.target.value })} aria-invalid={!!issue('reason')} />
        {issue('reason') && <p className="field-error">{issue('reason')}</p>}
      </div>
      <fieldset>
        <legend className="field-label">Severity</legend>
        <div className="flex gap-2">
          {(['exclude', 'caution'] as const).map((s) => (
            <label key={s} className={`flex min-h-12 flex-1 cursor-pointer items-center justify-center gap-2 rounded-lg border-2 px-3 font-semibold ${values.severity === s ? 'border-ink-900 bg-ink-50' : 'border-ink-200'}`}>
              <input type="radio" name="zone-severity" value={s} checked={values.severity === s} onChange={() => setValues({ ...values, severity: s })} />
              {s === 'exclude' ? 'Exclude' : 'Caution'}
            </label>
          ))}
        </div>
        {issue('severity') && <p className="field-error">{issue('severity')}</p>}
      </fieldset>
      <div className="grid grid-cols-2 gap-2">
        <div>
          <label className="field-label" htmlFor="zone-from">Valid from</label>
          <input id="zone-from" type="date" className="field-input" value={values.validFrom} onChange={(e) => setValues({ ...values, validFrom: e.target.value })} />
          {issue('validFrom') && <p className="field-error">{issue('validFrom')}</p>}
        </div>
        <div>
          <label className="field-label" htmlFor="zone-to">Valid to</label>
          <input id="zone-to" type="date" className="field-input" value={values.validTo} onChange={(e) => setValues({ ...values, validTo: e.target.value })} />
          {issue('validTo') && <p className="field-error">{issue('validTo')}</p>}
        </div>
      </div>
      {error && (
        <div role="alert" className="rounded-lg border border-red-300 bg-red-50 p-2 text-sm text-alarm">
          <p className="font-semibold">{geometryIssue ? `The polygon was refused: ${geometryIssue}` : error.message}</p>
        </div>
      )}
      <div className="flex gap-2">
        <button type="submit" className="btn-primary min-h-12 flex-1" disabled={busy}>
          {busy ? 'Saving…' : submitLabel}
        </button>
        <button type="button" className="btn-ghost min-h-12" onClick={onCancel}>
          Cancel
        </button>
      </div>
    </form>
  );
}

/** The zone's exact polygon from the server (tile-clipped source features are not the whole polygon). */
async function fetchZoneGeometry(id: string): Promise<Polygon | null> {
  const all = await mapApi.zones();
  return all.features.find((f) => f.id === id || f.properties.id === id)?.geometry ?? null;
}
