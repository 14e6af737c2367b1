// Picks one structure of the chosen line, or adds a new one at the surveyor's position.
import { useState } from 'react';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { STRUCTURE_KINDS, structureCreateSchema, type Structure, type StructureKind } from '#shared/schemas/inventory.ts';
import { formatQuantity, type UnitSystem } from '#shared/units.ts';
import { ApiError } from '../../../lib/api.ts';
import { inventoryQueries } from '../../spans/queries.ts';
import { inputToSi, unitLabel } from '../quantity.ts';
import { FieldError } from './form-bits.tsx';
import { useMe } from '../../auth/queries.ts';
import { createStructure, structureShownLabel } from '../offline-writes.ts';

const KIND_LABELS: Record<StructureKind, string> = { pole: 'Pole', tower: 'Tower', 'h-frame': 'H-frame', other: 'Other' };

export function structureName(s: Pick<Structure, 'id' | 'label' | 'kind'>) {
  return `${structureShownLabel(s)} · ${KIND_LABELS[s.kind] ?? s.kind}${s.id.startsWith('local-') ? ' · waiting to send' : ''}`;
}

interface Props {
  id: string;
  label: string;
  lineId: string;
  structures: Structure[];
  /** The label the saved record gives its chosen structure, shown while the line's list does not hold it yet. */
  savedLabel?: string;
  loading: boolean;
  value: string;
  onChange: (structureId: string) => void;
  onBlur?: () => void;
  disabled?: boolean;
  error?: string;
  unitSystem: UnitSystem;
}

export function StructurePicker({ id, label, lineId, structures, savedLabel, loading, value, onChange, onBlur, disabled, error, unitSystem }: Props) {
  const [adding, setAdding] = useState(false);
  const [kept, setKept] = useState(false);
  const listed = structures.some((s) => s.id === value);
  return (
    <div>
      <label className="field-label" htmlFor={id}>
        {label}
      </label>
      <div className="flex gap-2">
        <select
          id={id}
          className="field-input touch-input"
          value={value}
          onChange={(e) => onChange(e.target.value)}
          onBlur={onBlur}
          disabled={disabled || !lineId}
          aria-invalid={error ? true : undefined}
        >
          <option value="">{!lineId ? 'Choose the line first' : loading ? 'Loading structures…' : 'Choose a structure'}</option>
          {structures.map((s) => (
            <option key={s.id} value={s.id}>
              {structureName(s)}
            </option>
          ))}
          {value && !listed && savedLabel && <option value={value}>{savedLabel}</option>}
        </select>
        <button type="button" className="btn-ghost min-h-12 shrink-0" disabled={disabled || !lineId} onClick={() => setAdding((a) => !a)} aria-expanded={adding}>
          {adding ? 'Close' : 'Add here'}
        </button>
      </div>
      <FieldError id={id} message={error} />
      {kept && value.startsWith('local-') && (
        <p className="mt-1 text-sm text-ink-700" role="status">
          New structure kept on this device; it will be sent when there is a connection.
        </p>
      )}
      {adding && lineId && (
        <AddStructurePanel
          idPrefix={`${id}-new`}
          lineId={lineId}
          unitSystem={unitSystem}
          onAdded={(s, queued) => {
            onChange(s.id);
            setKept(queued);
            setAdding(false);
          }}
        />
      )}
    </div>
  );
}

function AddStructurePanel({ idPrefix, lineId, unitSystem, onAdded }: { idPrefix: string; lineId: string; unitSystem: UnitSystem; onAdded: (s: Structure, queued: boolean) => void }) {
  const queryClient = useQueryClient();
  const me = useMe();
  const lines = useQuery(inventoryQueries.lines());
  const [lat, setLat] = useState('');
  const [lon, setLon] = useState('');
  const [kind, setKind] = useState<StructureKind>('pole');
  const [height, setHeight] = useState('');
  const [label, setLabel] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [locating, setLocating] = useState<string | null>(null);

  const add = useMutation({
    // Runs with no signal too: createStructure keeps it in the outbox then.
    networkMode: 'always',
    mutationFn: (body: Parameters<typeof createStructure>[0]) => createStructure(body, lines.data?.find((l) => l.id === lineId), me.id),
    onSuccess: async ({ structure: s, queued }) => {
      // Kept offline, it joins the list from the outbox; sent, it joins the line's structures.
      if (!queued) {
        queryClient.setQueryData(inventoryQueries.structures(lineId).queryKey, (old: Structure[] | undefined) => [...(old ?? []), s]);
        await queryClient.invalidateQueries({ queryKey: inventoryQueries.structures(lineId).queryKey });
      }
      onAdded(s, queued);
    },
    onError: (err) => {
      if (err instanceof ApiError && err.issues.length) setErrors(Object.fromEntries(err.issues.map((i) => [i.path, i.message])));
      else setErrors({ form: err instanceof Error ? err.message : 'The structure was not saved' });
    },
  });

  const locate = () => {
    if (!('geolocation' in navigator)) {
      setLocating('This device cannot report its position; type the coordinates.');
      return;
    }
    setLocating('Finding your position…');
    navigator.geolocation.getCurrentPosition(
      (pos) => {
        setLat(pos.coords.latitude.toFixed(6));
        setLon(pos.coords.longitude.toFixed(6));
        setLocating(`Position found (±${formatQuantity(pos.coords.accuracy, 'length', unitSystem, { digits: 0 })}).`);
      },
      (err) => setLocating(err.code === err.PERMISSION_DENIED ? 'Location permission was refused; type the coordinates.' : 'No position fix yet; try again or type the coordinates.'),
      { enableHighAccuracy: true, timeout: 20_000, maximumAge: 0 },
    );
  };

  const submit = () => {
    const heightM = inputToSi(height, 'length', unitSystem);
    const body = {
      lineId,
      lat: lat.trim() === '' ? Number.NaN : Number(lat.replace(',', '.')),
      lon: lon.trim() === '' ? Number.NaN : Number(lon.replace(',', '.')),
      kind,
      attachmentHeightM: heightM ?? Number.NaN,
      ...(label.trim() ? { label: label.trim() } : {}),
    };
    const parsed = structureCreateSchema.safeParse(body);
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      return;
    }
    setErrors({});
    add.mutate({ ...parsed.data, attachmentHeightM: parsed.data.attachmentHeightM });
  };

  const lengthUnit = unitLabel('length', unitSystem);
  return (
    <div className="mt-3 space-y-3 rounded-xl border-2 border-dashed border-ink-200 bg-ink-50 p-3" role="group" aria-label="New structure">
      <button type="button" className="btn-accent min-h-12 w-full" onClick={locate}>
        Use my position
      </button>
      {locating && (
        <p className="text-sm text-ink-700" role="status">
          {locating}
        </p>
      )}
      <div className="grid grid-cols-2 gap-3">
        <div>
          <label className="field-label" htmlFor={`${idPrefix}-lat`}>Latitude (°)</label>
          <input id={`${idPrefix}-lat`} className="field-input touch-input" inputMode="decimal" value={lat} onChange={(e) => setLat(e.target.value)} />
          <FieldError id={`${idPrefix}-lat`} message={errors.lat} />
        </div>
        <div>
          <label className="field-label" htmlFor={`${idPrefix}-lon`}>Longitude (°)</label>
          <input id={`${idPrefix}-lon`} className="field-input touch-input" inputMode="decimal" value={lon} onChange={(e) => setLon(e.target.value)} />
          <FieldError id={`${idPrefix}-lon`} message={errors.lon} />
        </div>
        <div>
          <label className="field-label" htmlFor={`${idPrefix}-kind`}>Kind</label>
          <select id={`${idPrefix}-kind`} className="field-input touch-input" value={kind} onChange={(e) => setKind(e.target.value as StructureKind)}>
            {STRUCTURE_KINDS.map((k) => (
              <option key={k} value={k}>{KIND_LABELS[k]}</option>
            ))}
          </select>
        </div>
        <div>
          <label className="field-label" htmlFor={`${idPrefix}-height`}>Attachment height ({lengthUnit})</label>
          <input id={`${idPrefix}-height`} className="field-input touch-input" inputMode="decimal" value={height} onChange={(e) => setHeight(e.target.value)} />
          <FieldError id={`${idPrefix}-height`} message={errors.attachmentHeightM} />
        </div>
      </div>
      <div>
        <label className="field-label" htmlFor={`${idPrefix}-label`}>Label (optional; numbered for you when empty)</label>
        <input id={`${idPrefix}-label`} className="field-input touch-input" value={label} onChange={(e) => setLabel(e.target.value)} />
        <FieldError id={`${idPrefix}-label`} message={errors.label} />
      </div>
      <FieldError id={`${idPrefix}-form`} message={errors.form ?? errors.lineId} />
      <button type="button" className="btn-primary min-h-12 w-full" onClick={submit} disabled={add.isPending}>
        {add.isPending ? 'Adding…' : 'Add this structure'}
      </button>
    </div>
  );
}
