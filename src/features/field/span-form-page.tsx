// The surveyor's span form (tablet, one-handed): /field/spans/new and /field/spans/:id/edit.
import { useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { useForm } from 'react-hook-form';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { Link, Navigate, useLocation, useNavigate, useParams } from 'react-router';
import { TERRAINS, TERRAIN_LABELS, type Span } from '#shared/schemas/inventory.ts';
import { formatQuantity, unitLabel } from '#shared/units.ts';
import { Caution } from '../../components/caution.tsx';
import { api, ApiError, isNetworkError } from '../../lib/api.ts';
import { discardItem, isLocalId, newClientId, type OutboxItem } from '../../lib/outbox.ts';
import { useOutbox } from '../../lib/use-outbox.ts';
import { mustQueue, queueSpanSave, queueSubmit, waitingSpanWrites, waitingStructures } from './offline-writes.ts';
import { pageBusy, pageWorkDone } from '../../lib/page-work.ts';
import { useMe } from '../auth/queries.ts';
import { spanApi } from '../spans/api.ts';
import { inventoryQueries, spanQueries } from '../spans/queries.ts';
import { StatusBadge } from '../spans/components/status-badge.tsx';
import { StatusPage } from '../../components/status-page.tsx';
import { WaitingBadge } from '../../components/waiting-badge.tsx';
import { ConductorPicker } from './components/conductor-picker.tsx';
import { ConflictPanel } from './components/conflict-panel.tsx';
import { Field, QuantityField, SelectField } from './components/form-bits.tsx';
import { HazardList } from './components/hazard-list.tsx';
import { StructurePicker } from './components/structure-picker.tsx';
import { mergeChoices, savedFromConflict, type ConflictKey } from './conflict.ts';
import { dateTime } from '../../lib/format.ts';
import { backupDiffers, backupKey, clearBackup, readBackup, writeBackup, type FormBackup } from './local-backup.ts';
import {
  emptySpanForm,
  formValuesToCreate,
  formValuesToUpdate,
  mapIssues,
  missingForSubmit,
  spanFormResolver,
  spanToFormValues,
  type FieldIssue,
  type SpanFormValues,
} from './form-values.ts';

/** Where the photos feature plugs its uploader into the form (composed in src/app/router.tsx). */
export type SpanPhotoSlot = (ctx: { spanId: string | null; hazardIds: string[] }) => ReactNode;

export function SpanFormPage({ photoSlot }: { photoSlot?: SpanPhotoSlot }) {
  const { id } = useParams();
  const location = useLocation();
  const me = useMe();
  const outbox = useOutbox();
  const local = isLocalId(id);
  const span = useQuery({ ...spanQueries.detail(id ?? ''), enabled: !!id && !local, staleTime: 0 });
  // A span made offline has been sent meanwhile: continue on the server's record.
  if (local && outbox.ids[id]) return <Navigate to={`/field/spans/${outbox.ids[id]}/edit`} replace />;
  if (id && !outbox.loaded) return <p className="p-8 text-center text-ink-700">Loading the span…</p>;
  const writes = id ? waitingSpanWrites(outbox.items.filter((i) => i.userId === me.id), id) : [];
  const create = writes.find((i) => i.kind === 'span.create');
  const update = writes.find((i) => i.kind === 'span.update');
  if (local) {
    if (!create) return <StatusPage code={404} title="Not on this device" message="This span was made offline and is no longer waiting here: it was sent or discarded. Find it in My spans." />;
    return <SpanForm key={(location.state as { formKey?: string } | null)?.formKey ?? id} saved={create.preview as Span} queued={create} photoSlot={photoSlot} />;
  }
  if (id && span.isPending) return <p className="p-8 text-center text-ink-700">Loading the span…</p>;
  if (id && span.error) throw span.error;
  // Keyed by span id so switching spans starts a fresh form; a new span's first save keeps the same form (its
  // photos picked before that save upload right after it).
  const key = (location.state as { formKey?: string } | null)?.formKey ?? id ?? 'new';
  return <SpanForm key={key} saved={span.data ?? null} queued={update} photoSlot={photoSlot} />;
}

type Intent = 'draft' | 'submit';

function SpanForm({ saved: initial, queued, photoSlot }: { saved: Span | null; queued?: OutboxItem; photoSlot?: SpanPhotoSlot }) {
  const me = useMe();
  const system = me.unitSystem;
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const [saved, setSaved] = useState<Span | null>(initial);
  const versionRef = useRef<number | undefined>(initial?.version);
  const [busy, setBusy] = useState(false);
  const location = useLocation();
  const [notice, setNotice] = useState<string | null>(() => (location.state as { notice?: string } | null)?.notice ?? null);
  const [formError, setFormError] = useState<string | null>(null);
  // A queued change the server refused as stale goes to the side-by-side view as soon as the span is opened.
  const [conflict, setConflict] = useState<{ mine: SpanFormValues; base: SpanFormValues; saved: Span; intent: Intent; itemId?: string } | null>(() =>
    queued?.state === 'conflict' && queued.current
      ? { mine: queued.formValues as SpanFormValues, base: (queued.baseFormValues ?? queued.formValues) as SpanFormValues, saved: queued.current as Span, intent: 'draft', itemId: queued.id }
      : null,
  );
  const [waitingItem, setWaitingItem] = useState<OutboxItem | undefined>(queued);
  const outbox = useOutbox();
  const mine = outbox.items.filter((i) => i.userId === me.id);
  const waitingHere = saved ? waitingSpanWrites(mine, saved.id) : [];

  const form = useForm<SpanFormValues>({
    // Entries kept in the outbox are what the surveyor last saw: the form opens on them.
    defaultValues: queued?.formValues && queued.state !== 'conflict' ? (queued.formValues as SpanFormValues) : initial ? spanToFormValues(initial, system) : emptySpanForm(),
    resolver: spanFormResolver(system, () => versionRef.current),
    mode: 'onBlur',
    reValidateMode: 'onChange',
  });
  const { register, watch, setValue, setError, clearErrors, formState, getValues, reset } = form;
  const lineId = watch('lineId');

  // Entries are copied to the device as they are typed, until the server has them.
  const storageKey = backupKey(me.id, saved?.id ?? null);
  const [offer, setOffer] = useState<FormBackup | null>(() => {
    const b = readBackup(window.localStorage, backupKey(me.id, initial?.id ?? null));
    return b && backupDiffers(b, initial ? spanToFormValues(initial, system) : emptySpanForm()) ? b : null;
  });
  const offerPending = useRef(offer !== null);
  useEffect(() => {
    let timer: ReturnType<typeof setTimeout> | undefined;
    const sub = watch(() => {
      if (offerPending.current) return;
      clearTimeout(timer);
      timer = setTimeout(() => {
        const values = getValues();
        if (backupDiffers({ values, baseVersion: null, savedAt: '' }, form.formState.defaultValues as SpanFormValues))
          writeBackup(window.localStorage, storageKey, { values, baseVersion: versionRef.current ?? null, savedAt: new Date().toISOString() });
      }, 400);
    });
    return () => {
      clearTimeout(timer);
      sub.unsubscribe();
    };
  }, [watch, getValues, form, storageKey]);

  const restoreBackup = (b: FormBackup) => {
    offerPending.current = false;
    setOffer(null);
    for (const [k, v] of Object.entries(b.values)) setValue(k as keyof SpanFormValues, v as never, { shouldDirty: true });
    // Saving against the version the entries were made on: if the record moved on since, the conflict view shows both.
    if (b.baseVersion !== null) versionRef.current = b.baseVersion;
    setNotice('Unsaved entries restored from this device.');
  };
  const discardBackup = () => {
    offerPending.current = false;
    setOffer(null);
    clearBackup(window.localStorage, storageKey);
  };

  const lines = useQuery(inventoryQueries.lines());
  const structures = useQuery(inventoryQueries.structures(lineId));
  const conductors = useQuery(inventoryQueries.conductors());
  const hazardKinds = useQuery(inventoryQueries.hazardKinds());
  const line = lines.data?.find((l) => l.id === lineId);
  const offlineStructures = useMemo(() => waitingStructures(mine, lineId), [mine, lineId]);
  const structureList = useMemo(
    () => [...(structures.data ?? []), ...offlineStructures.filter((o) => !structures.data?.some((s) => s.id === o.id))].sort((a, b) => a.label.localeCompare(b.label, undefined, { numeric: true })),
    [structures.data, offlineStructures],
  );
  // A kept copy of the line's structures (read before a structure was added) may lack one the form has chosen:
  // read the list again, once per missing structure, while the saved record's label stands in for it.
  const askedFor = useRef(new Set<string>());
  const fromId = watch('fromStructureId');
  const toId = watch('toStructureId');
  useEffect(() => {
    if (!structures.data || structures.isFetching) return;
    const missing = [fromId, toId].filter((v) => v && !isLocalId(v) && !askedFor.current.has(v) && !structureList.some((s) => s.id === v));
    if (!missing.length) return;
    for (const v of missing) askedFor.current.add(v);
    void structures.refetch();
  }, [fromId, toId, structures, structureList]);
  // A structure made offline has been sent: the form now names it by the server's id.
  useEffect(() => {
    for (const name of ['fromStructureId', 'toStructureId'] as const) {
      const v = getValues(name);
      if (isLocalId(v) && outbox.ids[v]) setValue(name, outbox.ids[v]);
    }
  }, [outbox.ids, getValues, setValue]);

  useEffect(() => {
    if (!notice) return;
    const t = setTimeout(() => setNotice(null), 6000);
    return () => clearTimeout(t);
  }, [notice]);

  const showIssues = (issues: FieldIssue[]) => {
    const formLevel: string[] = [];
    // Conductor details are hidden while a catalogue code word is chosen: show their messages on the picker.
    const catalogue = getValues('conductorMode') === 'catalogue';
    issues = issues.map((i) => (catalogue && (i.field === 'conductorDiameter' || i.field === 'conductorSize' || i.field === 'conductorMaterial') ? { ...i, field: 'conductorCodeWord' } : i));
    for (const i of issues) {
      if (i.field) setError(i.field, { type: 'server', message: i.message }, { shouldFocus: false });
      else formLevel.push(i.message);
    }
    setFormError(formLevel.length ? formLevel.join(' ') : 'Some fields need attention; see the messages beside them.');
    const first = issues.find((i) => i.field)?.field;
    if (first) form.setFocus(first as never);
  };

  const save = async (values: SpanFormValues, intent: Intent) => {
    setFormError(null);
    setNotice(null);
    const canSubmit = !saved || saved.status === 'draft' || saved.status === 'returned';
    if (intent === 'submit' && canSubmit) {
      const missing = missingForSubmit(values, system);
      if (missing.length) return showIssues(missing);
    }
    setBusy(true);
    const key = newClientId();
    const keep = async () => {
      const { span: kept } = await queueSpanSave({
        values,
        base: (waitingItem?.baseFormValues ?? structuredClone(form.formState.defaultValues)) as SpanFormValues,
        system,
        saved,
        version: versionRef.current,
        line,
        structures: structureList,
        idempotencyKey: key,
      });
      if (intent === 'submit' && (kept.status === 'draft' || kept.status === 'returned')) await queueSubmit(kept);
      clearBackup(window.localStorage, backupKey(me.id, saved?.id ?? null));
      offerPending.current = false;
      setOffer(null);
      if (intent === 'submit') {
        // Photos picked before the first save are kept with the span before the page is left.
        setSaved(kept);
        await new Promise((r) => setTimeout(r, 0));
        if (pageBusy()) await pageWorkDone();
        navigate('/field', { state: { notice: 'Kept on this device: it will be submitted when there is a connection.' } });
        return;
      }
      setSaved(kept);
      reset(values);
      setNotice('Kept on this device; it will be sent when there is a connection.');
      // The same form goes on at the new span's address (photos picked before this save follow it).
      if (!saved) navigate(`/field/spans/${kept.id}/edit`, { replace: true, state: { formKey: 'new' } });
    };
    if (mustQueue(me.id) || isLocalId(saved?.id)) {
      try {
        await keep();
      } catch (err) {
        setFormError(err instanceof Error ? err.message : 'The span could not be kept on this device.');
      } finally {
        setBusy(false);
      }
      return;
    }
    try {
      let result = saved
        ? await spanApi.update(saved.id, formValuesToUpdate(values, system, versionRef.current ?? saved.version))
        : await api.send<Span>('POST', '/api/spans', formValuesToCreate(values, system), { 'Idempotency-Key': key });
      versionRef.current = result.version;
      setSaved(result);
      queryClient.setQueryData(spanQueries.detail(result.id).queryKey, result);
      if (intent === 'submit' && (result.status === 'draft' || result.status === 'returned')) {
        result = await spanApi.submit(result.id, result.version);
        versionRef.current = result.version;
        setSaved(result);
        queryClient.setQueryData(spanQueries.detail(result.id).queryKey, result);
      }
      await queryClient.invalidateQueries({ queryKey: spanQueries.lists() });
      reset(spanToFormValues(result, system));
      // The server has everything now: the device copy (of this span, or of the new-span form) can go.
      clearBackup(window.localStorage, backupKey(me.id, saved?.id ?? null));
      clearBackup(window.localStorage, backupKey(me.id, result.id));
      offerPending.current = false;
      setOffer(null);
      if (intent === 'submit') {
        // Photos picked before the first save upload now; the page is left once they are in (their bars show).
        if (pageBusy()) {
          setNotice('Saved. Uploading the photos before leaving…');
          if (!(await pageWorkDone())) {
            // A photo did not go up: stay on the (now saved) span so the row's message and "Try again" are seen.
            setFormError(`${result.status === 'submitted' ? 'Span submitted for review' : 'Changes saved'}, but a photo was not uploaded; see the photo below.`);
            if (!initial) navigate(`/field/spans/${result.id}/edit`, { replace: true, state: { formKey: 'new' } });
            return;
          }
        }
        navigate('/field', { state: { notice: result.status === 'submitted' ? 'Span submitted for review.' : 'Changes saved.' } });
        return;
      }
      setNotice(result.status === 'draft' ? 'Draft saved.' : result.status === 'submitted' && initial?.status === 'approved' ? 'Saved. Safety-relevant changes send the span back to review.' : 'Changes saved.');
      if (!initial) navigate(`/field/spans/${result.id}/edit`, { replace: true, state: { formKey: 'new' } });
    } catch (err) {
      // The connection dropped on the way: keep it in the outbox (a create with the same key, so never twice).
      if (isNetworkError(err)) return void (await keep().catch((e: unknown) => setFormError(e instanceof Error ? e.message : 'Not saved')));
      if (err instanceof ApiError && err.status === 400 && err.issues.length) showIssues(mapIssues(err.issues));
      else if (err instanceof ApiError && err.status === 409) {
        const current = savedFromConflict(err.body);
        if (current) setConflict({ mine: values, base: structuredClone(form.formState.defaultValues) as SpanFormValues, saved: current, intent });
        else if (err.issues.some((i) => i.path !== 'status')) showIssues(mapIssues(err.issues.filter((i) => i.path !== 'status')));
        else setFormError(err.message);
      } else setFormError(err instanceof Error ? err.message : 'The span was not saved. Your entries are still here; try again.');
    } finally {
      setBusy(false);
    }
  };

  const resolveConflict = (takeMine: Set<ConflictKey>, andSave: boolean) => {
    if (!conflict) return;
    const merged = mergeChoices(conflict.mine, conflict.saved, system, takeMine);
    versionRef.current = conflict.saved.version;
    setSaved(conflict.saved);
    queryClient.setQueryData(spanQueries.detail(conflict.saved.id).queryKey, conflict.saved);
    const intent = conflict.intent;
    // The queued change is settled here: what is kept is saved from this form.
    if (conflict.itemId) {
      void discardItem(conflict.itemId);
      setWaitingItem(undefined);
    }
    setConflict(null);
    if (andSave) {
      // Keep the merged values as edits on top of the saved version, then save them.
      reset(spanToFormValues(conflict.saved, system));
      for (const [k, v] of Object.entries(merged)) setValue(k as keyof SpanFormValues, v as never, { shouldDirty: true });
      void save(merged, intent);
    } else {
      reset(merged);
      setNotice(`Showing the saved record (version ${conflict.saved.version}).`);
    }
  };

  const submitWith = (intent: Intent) => form.handleSubmit((v) => save(v, intent), () => setFormError('Some fields need attention; see the messages beside them.'));
  const canSubmit = !saved || saved.status === 'draft' || saved.status === 'returned';
  // The server refuses edits to spans awaiting review or suspended; the form says so instead of offering a save.
  const editable = !saved || (saved.status !== 'submitted' && saved.status !== 'suspended');
  const errors = formState.errors;
  const lengthUnit = unitLabel('length', system);
  const structureLabel = (sid: string) => structureList.find((s) => s.id === sid)?.label;

  return (
    <form
      className="mx-auto max-w-3xl pb-32"
      noValidate
      aria-label="Span survey"
      onSubmit={(e) => {
        e.preventDefault();
        void submitWith('draft')();
      }}
    >
      <header className="mb-4 space-y-2">
        <Link to="/field" className="text-sm font-semibold text-ink-700 underline">← My spans</Link>
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="page-title">{saved ? `Span ${saved.fromStructureLabel} → ${saved.toStructureLabel}` : 'New span'}</h1>
          {saved && <StatusBadge status={saved.status} />}
          {saved && !isLocalId(saved.id) && <span className="text-sm text-ink-700">version {saved.version}</span>}
          {waitingHere.length > 0 && <WaitingBadge />}
        </div>
        {waitingHere.length > 0 && (
          <p className="rounded-lg border border-brass-300 bg-brass-100 p-3 text-sm" data-testid="span-waiting">
            Kept on this device, waiting to be sent: {waitingHere.map((i) => i.label).join('; ')}.{' '}
            <Link to="/field/outbox" className="font-semibold underline">Field outbox</Link>
          </p>
        )}
        {saved?.status === 'returned' && saved.returnReason && (
          <div className="rounded-lg border-2 border-alarm bg-red-50 p-3" role="note" aria-label="Reviewer's reason">
            <p className="font-bold text-alarm">Sent back by the reviewer:</p>
            <p className="whitespace-pre-wrap">{saved.returnReason}</p>
          </div>
        )}
        {saved?.status === 'approved' && (
          <p className="rounded-lg bg-brass-100 p-3 text-sm">This span is approved. Changing the structures, conductor, clearances, load, terrain or hazards sends it back to review.</p>
        )}
        {saved?.status === 'suspended' && saved.suspendReason && <p className="rounded-lg bg-ink-50 p-3 text-sm">Suspended by safety: {saved.suspendReason}</p>}
      </header>

      {offer && (
        <section className="card mb-4 space-y-3 border-2 border-brass-500" aria-labelledby="backup-title">
          <h2 id="backup-title" className="text-lg font-bold">Unsaved entries on this device</h2>
          <p>
            Entries from {dateTime(offer.savedAt)} were not saved to the server
            {saved && offer.baseVersion !== null && offer.baseVersion !== saved.version
              ? ` (made on version ${offer.baseVersion}; the record is now version ${saved.version}, so saving will show you both)`
              : ''}
            .
          </p>
          <div className="flex flex-wrap gap-3">
            <button type="button" className="btn-primary min-h-12" onClick={() => restoreBackup(offer)}>
              Restore my entries
            </button>
            <button type="button" className="btn-ghost min-h-12" onClick={discardBackup}>
              Discard them
            </button>
          </div>
        </section>
      )}

      {conflict && (
        <div className="mb-4">
          <ConflictPanel
            mine={conflict.mine}
            base={conflict.base}
            saved={conflict.saved}
            unitSystem={system}
            busy={busy}
            lookups={{ structures: structureList, hazardKinds: hazardKinds.data ?? [] }}
            onResolve={resolveConflict}
          />
        </div>
      )}

      <div className="space-y-4">
        <section className="card space-y-4" aria-labelledby="sec-where">
          <h2 id="sec-where" className="text-lg font-bold">Where</h2>
          {saved ? (
            <div>
              <p className="field-label">Line</p>
              <p className="text-lg font-semibold" data-testid="line-fixed">{line ? `${line.name} (${line.voltageKv} kV)` : saved.lineName}</p>
              <p className="text-sm text-ink-700">A saved span stays on its line.</p>
            </div>
          ) : (
            <Field id="lineId" label="Line" error={errors.lineId?.message} hint={line ? `${line.voltageKv} kV · ${line.frequencyHz} Hz · ${line.owner}` : undefined}>
              <SelectField
                control={form.control}
                name="lineId"
                id="lineId"
                invalid={!!errors.lineId}
                onValueChange={() => {
                  setValue('fromStructureId', '');
                  setValue('toStructureId', '');
                }}
              >
                <option value="">{lines.isPending ? 'Loading lines…' : 'Choose a line'}</option>
                {lines.data?.map((l) => (
                  <option key={l.id} value={l.id}>{l.name} ({l.voltageKv} kV)</option>
                ))}
              </SelectField>
            </Field>
          )}
          <div className="grid gap-4 sm:grid-cols-2">
            {(['fromStructureId', 'toStructureId'] as const).map((name) => (
              <StructurePicker
                key={name}
                id={name}
                label={name === 'fromStructureId' ? 'From structure' : 'To structure'}
                lineId={lineId}
                structures={structureList}
                savedLabel={saved && watch(name) === saved[name] ? (name === 'fromStructureId' ? saved.fromStructureLabel : saved.toStructureLabel) : undefined}
                loading={structures.isPending}
                value={watch(name)}
                onChange={(v) => {
                  setValue(name, v, { shouldDirty: true });
                  clearErrors(name);
                }}
                error={errors[name]?.message}
                unitSystem={system}
              />
            ))}
          </div>
          {saved?.lengthM != null && (
            <p className="text-sm text-ink-700">
              Span length (geodesic between {structureLabel(saved.fromStructureId) ?? saved.fromStructureLabel} and {structureLabel(saved.toStructureId) ?? saved.toStructureLabel}):{' '}
              <strong>{formatQuantity(saved.lengthM, 'length', system)}</strong>
            </p>
          )}
        </section>

        <section className="card space-y-4" aria-labelledby="sec-conductor">
          <h2 id="sec-conductor" className="text-lg font-bold">Conductor</h2>
          <ConductorPicker form={form} catalogue={conductors.data ?? []} unitSystem={system} />
          <Field id="phasePosition" label="Phase / position (optional)" error={errors.phasePosition?.message}>
            <input id="phasePosition" className="field-input touch-input" placeholder="e.g. top phase, A" {...register('phasePosition')} />
          </Field>
        </section>

        <section className="card space-y-4" aria-labelledby="sec-clearance">
          <h2 id="sec-clearance" className="text-lg font-bold">Clearances</h2>
          <Caution compact />
          <div className="grid gap-4 sm:grid-cols-2">
            <QuantityField id="clearance" label="Ground clearance at the perch point" unit={lengthUnit} registration={register('clearance')} error={errors.clearance?.message} />
            <QuantityField id="lowestClearance" label="Lowest clearance measured" unit={lengthUnit} registration={register('lowestClearance')} error={errors.lowestClearance?.message} />
            <QuantityField
              id="lowestClearanceAlong"
              label="Lowest clearance measured at, from the from-structure"
              unit={lengthUnit}
              registration={register('lowestClearanceAlong')}
              error={errors.lowestClearanceAlong?.message}
              hint={saved?.lengthM != null ? `Between 0 and ${formatQuantity(saved.lengthM, 'length', system)}.` : undefined}
            />
          </div>
        </section>

        <section className="card space-y-4" aria-labelledby="sec-site">
          <h2 id="sec-site" className="text-lg font-bold">Site and load</h2>
          <Field id="terrain" label="Terrain under the span" error={errors.terrain?.message}>
            <SelectField control={form.control} name="terrain" id="terrain" invalid={!!errors.terrain}>
              <option value="">Not recorded yet</option>
              {TERRAINS.map((t) => (
                <option key={t} value={t}>{TERRAIN_LABELS[t]}</option>
              ))}
            </SelectField>
          </Field>
          <QuantityField
            id="loadCurrent"
            label="Estimated load current"
            unit={unitLabel('current', system)}
            registration={register('loadCurrent')}
            error={errors.loadCurrent?.message}
            placeholder={line ? `Empty: the line's typical ${line.loadTypicalA} A` : 'Empty: the line’s estimate'}
            hint="Leave empty to inherit the line's load estimate."
          />
          <Field id="surveyDate" label="Survey date" error={errors.surveyDate?.message}>
            <input id="surveyDate" type="date" className="field-input touch-input" {...register('surveyDate')} />
          </Field>
        </section>

        <section className="card space-y-4" aria-labelledby="sec-hazards">
          <h2 id="sec-hazards" className="text-lg font-bold">Hazards</h2>
          <HazardList form={form} kinds={hazardKinds.data ?? []} unitSystem={system} />
        </section>

        {/* PHOTO UPLOADER SLOT: the photos feature renders its uploader here (passed in from src/app/router.tsx). */}
        {photoSlot && (
          <section className="card space-y-4" aria-labelledby="sec-photos" data-slot="span-photos">
            <h2 id="sec-photos" className="text-lg font-bold">Photos</h2>
            {photoSlot({ spanId: saved?.id ?? null, hazardIds: saved?.hazards.map((h) => h.id) ?? [] })}
          </section>
        )}
      </div>

      {/* Primary actions at the bottom edge, in thumb reach, always visible. */}
      <div className="fixed inset-x-0 bottom-0 z-20 border-t border-ink-200 bg-white/95 px-4 py-3 shadow-[0_-4px_12px_rgba(0,0,0,0.08)] backdrop-blur">
        <div className="mx-auto max-w-3xl space-y-2">
          {formError && (
            <p className="field-error mt-0" role="alert" data-testid="form-error">
              {formError}
            </p>
          )}
          {notice && (
            <p className="text-sm font-semibold text-go" role="status">
              {notice}
            </p>
          )}
          {!editable && (
            <p className="text-sm font-semibold text-ink-700">
              {saved?.status === 'submitted' ? 'Awaiting review: a safety officer can send it back to you for changes.' : 'Suspended: a safety officer must reinstate it before it can be edited.'}
            </p>
          )}
          <div className="flex gap-3">
            <button type="button" className="btn-ghost min-h-12 flex-1 text-lg" disabled={busy || !editable} onClick={() => void submitWith('draft')()}>
              {saved && !canSubmit ? 'Save changes' : 'Save draft'}
            </button>
            {canSubmit && (
              <button type="button" className="btn-primary min-h-12 flex-1 text-lg" disabled={busy} onClick={() => void submitWith('submit')()}>
                Submit for review
              </button>
            )}
          </div>
        </div>
      </div>
    </form>
  );
}

