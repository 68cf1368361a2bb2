import { useQuery } from '@tanstack/react-query';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { IMPORT_COMMIT_CHOICES, type ImportCommitChoice } from '../../../../shared/constants/imports';
import { WEIGHING_STAGES, type WeighingStage } from '../../../../shared/constants/records';
import { formatOf } from '../../../../shared/imports/detect';
import { DATE_ORDERS } from '../../../../shared/imports/dates';
import { IMPORT_ENCODINGS } from '../../../../shared/imports/encoding';
import { DELIMITER_LABELS, IMPORT_DELIMITERS } from '../../../../shared/imports/format';
import { IMPORT_MASS_UNITS, type ImportMassUnit } from '../../../../shared/imports/mass-units';
import { importMappingSchema, type ImportColumn, type ImportDetail, type ImportFormat, type ImportMapping } from '../../../../shared/schemas/imports';
import { ErrorNote } from '../../../components/ui/page';
import { couponListQuery } from '../../../lib/queries/records';
import { runOptionsQuery } from '../../../lib/queries/options';
import { isBusy } from '../api/imports-queries';
import { useCommit, usePreview, useSample, useSavePreset } from '../api/use-import-actions';

const ORDER_LABELS = { ymd: 'year first (2026-03-01)', dmy: 'day first (01/03/2026)', mdy: 'month first (03/01/2026)' } as const;
const ENCODING_LABELS = {
  'utf-8': 'UTF-8',
  'utf-16le': 'UTF-16 little-endian',
  'utf-16be': 'UTF-16 big-endian',
  'windows-1252': 'Windows-1252 (Western European)',
} as const;
const STAGE_LABELS: Record<WeighingStage, string> = { dry: 'Dry', soaked: 'Soaked', cured: 'Cured', 'wet-test': 'Wet test', 'drying-check': 'Drying check' };

interface FormValues {
  mode: 'tag' | 'sequence';
  tagColumn: string;
  massColumn: string;
  unitColumn: string;
  fixedUnit: ImportMassUnit;
  dateColumn: string;
  timeColumn: string;
  stabilityColumn: string;
  stage: WeighingStage | '';
  includeUnstable: boolean;
  existing: 'skip' | 'correct';
  correctionReason: string;
  runId: string;
  choice: ImportCommitChoice;
  again: boolean;
  presetName: string;
}

const col = (v: number | null | undefined) => (v === null || v === undefined ? '' : String(v));
const num = (v: string) => (v === '' ? null : Number(v));

function valuesOf(d: ImportDetail, m: ImportMapping | null): FormValues {
  const s = d.detected.suggested;
  return {
    mode: m?.target.mode ?? (s.tagColumn === null ? 'sequence' : 'tag'),
    tagColumn: col(m?.target.mode === 'tag' ? m.target.tagColumn : s.tagColumn),
    massColumn: col(m ? m.massColumn : s.massColumn),
    unitColumn: col(m ? m.unitColumn : s.unitColumn),
    fixedUnit: m?.fixedUnit ?? d.detected.unitInReading ?? 'g',
    dateColumn: col(m ? m.dateColumn : s.dateColumn),
    timeColumn: col(m ? m.timeColumn : s.timeColumn),
    stabilityColumn: col(m ? m.stabilityColumn : s.stabilityColumn),
    stage: m?.stage ?? '',
    includeUnstable: m?.includeUnstable ?? false,
    existing: m?.existing ?? 'skip',
    correctionReason: m?.correctionReason ?? '',
    runId: m?.target.mode === 'sequence' ? String(m.target.runId) : '',
    choice: 'accepted-only',
    again: false,
    presetName: '',
  };
}

function ColumnSelect({
  id,
  label,
  columns,
  optional,
  register,
  error,
}: {
  id: string;
  label: string;
  columns: ImportColumn[];
  optional: boolean;
  register: object;
  error?: string;
}) {
  return (
    <div className="mb-3">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <select id={id} className="field-input" aria-invalid={error ? true : undefined} aria-describedby={error ? `${id}-error` : undefined} {...register}>
        <option value="">{optional ? '— none —' : '— choose a column —'}</option>
        {columns.map((c) => (
          <option key={c.index} value={c.index}>
            {c.name}
            {c.examples[0] ? ` (e.g. ${c.examples[0]})` : ''}
          </option>
        ))}
      </select>
      {error && (
        <p id={`${id}-error`} role="alert" className="mt-1 text-sm text-margin">
          {error}
        </p>
      )}
    </div>
  );
}

/** The run's coupons in weighing order, reorderable with buttons (keyboard-friendly, no dragging needed). */
function SequenceOrder({ runId, order, setOrder }: { runId: number; order: number[]; setOrder: (ids: number[]) => void }) {
  const coupons = useQuery(couponListQuery({ runId, pageSize: 200, sort: 'tag' }));
  const items = coupons.data?.items;
  useEffect(() => {
    if (items && (order.length === 0 || order.some((id) => !items.find((c) => c.id === id)))) setOrder(items.map((c) => c.id));
  }, [items, order, setOrder]);
  if (coupons.isPending) return <p className="text-ink-faint">Loading the run's coupons…</p>;
  if (coupons.isError) return <ErrorNote error={coupons.error} />;
  const tagOf = new Map(items?.map((c) => [c.id, c.tag]));
  const move = (i: number, by: number) => {
    const next = [...order];
    const [x] = next.splice(i, 1);
    next.splice(i + by, 0, x as number);
    setOrder(next);
  };
  return (
    <div className="mb-3">
      <p className="field-label" id="sequence-heading">
        Weighing order ({order.length} coupons): the first reading of the file goes to the first coupon, and so on
      </p>
      <ol aria-labelledby="sequence-heading" className="mt-1 max-h-72 overflow-auto rounded border border-rule bg-white/60">
        {order.map((id, i) => (
          <li key={id} className="flex items-center justify-between gap-2 border-b border-paper-edge px-2 py-1 text-sm">
            <span>
              {i + 1}. {tagOf.get(id) ?? `coupon ${id}`}
            </span>
            <span className="flex gap-1">
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                disabled={i === 0}
                onClick={() => move(i, -1)}
                aria-label={`Move ${tagOf.get(id)} earlier`}
              >
                ↑
              </button>
              <button
                type="button"
                className="btn-quiet px-2 py-0.5 text-xs"
                disabled={i === order.length - 1}
                onClick={() => move(i, 1)}
                aria-label={`Move ${tagOf.get(id)} later`}
              >
                ↓
              </button>
            </span>
          </li>
        ))}
      </ol>
    </div>
  );
}

function SampleTable({ columns, rows }: { columns: ImportColumn[]; rows: string[][] }) {
  return (
    <div className="mb-4 max-h-80 overflow-auto">
      <table className="data-table">
        <caption className="sr-only">The first rows of the file as read with these choices</caption>
        <thead>
          <tr>
            {columns.map((c) => (
              <th key={c.index} scope="col">
                {c.name}
                <span className="block text-xs font-normal text-ink-faint">{c.kind}</span>
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.slice(0, 10).map((r, i) => (
            <tr key={i}>
              {columns.map((c) => (
                <td key={c.index} className="whitespace-pre font-mono text-xs">
                  {r[c.index] ?? ''}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** How the file is read, which column means what, the stage, and the preview and commit buttons. */
export function MappingForm({ d }: { d: ImportDetail }) {
  const [format, setFormat] = useState<ImportFormat>(d.mapping?.format ?? formatOf(d.detected));
  const [view, setView] = useState({ columns: d.columns, sampleRows: d.sampleRows });
  const [order, setOrder] = useState<number[]>(d.mapping?.target.mode === 'sequence' ? d.mapping.target.couponIds : []);
  const sample = useSample(d.id);
  const preview = usePreview(d.id);
  const commit = useCommit(d.id);
  const savePreset = useSavePreset(d.id);
  const runs = useQuery(runOptionsQuery());
  const form = useForm<FormValues>({ defaultValues: valuesOf(d, d.mapping) });
  const { register, watch, handleSubmit, setError, formState, reset } = form;
  const mode = watch('mode');
  const runId = watch('runId');
  const existing = watch('existing');
  const busy = isBusy(d) || preview.isPending || commit.isPending;

  function changeFormat(next: ImportFormat) {
    setFormat(next);
    sample.mutate(next, { onSuccess: (v) => setView(v) });
  }

  function mappingOf(v: FormValues): ImportMapping | null {
    const target =
      v.mode === 'tag' ? { mode: 'tag' as const, tagColumn: num(v.tagColumn) } : { mode: 'sequence' as const, runId: num(v.runId), couponIds: order };
    const parsed = importMappingSchema.safeParse({
      format,
      target,
      massColumn: num(v.massColumn),
      unitColumn: num(v.unitColumn),
      fixedUnit: v.fixedUnit,
      dateColumn: num(v.dateColumn),
      timeColumn: num(v.timeColumn),
      stabilityColumn: num(v.stabilityColumn),
      utcOffsetMinutes: -new Date().getTimezoneOffset(),
      stage: v.stage || undefined,
      includeUnstable: v.includeUnstable,
      existing: v.existing,
      correctionReason: v.existing === 'correct' ? v.correctionReason : undefined,
    });
    if (parsed.success) return parsed.data;
    const names: Record<string, keyof FormValues> = {
      'target.tagColumn': 'tagColumn',
      'target.runId': 'runId',
      'target.couponIds': 'runId',
      massColumn: 'massColumn',
      stage: 'stage',
      correctionReason: 'correctionReason',
    };
    for (const issue of parsed.error.issues) {
      const field = names[issue.path.join('.')];
      const message =
        field === 'stage'
          ? 'Choose the stage these readings were taken at'
          : field === 'massColumn' || field === 'tagColumn'
            ? 'Choose a column'
            : field === 'runId'
              ? 'Choose the run whose coupons were weighed'
              : issue.message;
      if (field) setError(field, { message });
    }
    return null;
  }

  const onPreview = handleSubmit((v) => {
    const m = mappingOf(v);
    if (m) preview.mutate({ mapping: m });
  });
  const onCommit = handleSubmit((v) => {
    const m = mappingOf(v);
    if (m) commit.mutate({ mapping: m, choice: v.choice, again: v.again });
  });
  const onSavePreset = handleSubmit((v) => {
    const m = mappingOf(v);
    if (!v.presetName.trim()) return setError('presetName', { message: 'Name the mapping, e.g. after the scale' });
    if (m) savePreset.mutate({ name: v.presetName.trim(), mapping: m });
  });
  const applyPreset = (id: string) => {
    const p = d.presets.find((x) => String(x.id) === id);
    if (!p) return;
    changeFormat(p.mapping.format);
    if (p.mapping.target.mode === 'sequence') setOrder(p.mapping.target.couponIds);
    reset(valuesOf(d, p.mapping));
  };
  const err = (k: keyof FormValues) => formState.errors[k]?.message;
  const columns = view.columns;

  return (
    <form className="space-y-8" onSubmit={(e) => e.preventDefault()} noValidate>
      <section aria-labelledby="format-heading" className="sheet p-5">
        <h2 id="format-heading" className="mb-3">
          How the file is read
        </h2>
        <p className="mb-4 text-sm text-ink-soft">What Lumenbook found, and why. Change any choice that is wrong; the sample below follows.</p>
        <div className="grid gap-x-6 sm:grid-cols-2">
          <Choice id="fmt-encoding" label="Encoding" reason={d.detected.encoding}>
            <select
              id="fmt-encoding"
              className="field-input"
              value={format.encoding}
              onChange={(e) => changeFormat({ ...format, encoding: e.target.value as ImportFormat['encoding'] })}
            >
              {IMPORT_ENCODINGS.map((x) => (
                <option key={x} value={x}>
                  {ENCODING_LABELS[x]}
                </option>
              ))}
            </select>
          </Choice>
          <Choice id="fmt-delimiter" label="Columns separated by" reason={d.detected.delimiter}>
            <select
              id="fmt-delimiter"
              className="field-input"
              value={format.delimiter}
              onChange={(e) => changeFormat({ ...format, delimiter: e.target.value as ImportFormat['delimiter'] })}
            >
              {IMPORT_DELIMITERS.map((x) => (
                <option key={x} value={x}>
                  {DELIMITER_LABELS[x]}
                </option>
              ))}
            </select>
          </Choice>
          <Choice id="fmt-header" label="First line" reason={d.detected.hasHeader}>
            <select
              id="fmt-header"
              className="field-input"
              value={format.hasHeader ? 'yes' : 'no'}
              onChange={(e) => changeFormat({ ...format, hasHeader: e.target.value === 'yes' })}
            >
              <option value="yes">is a header of column names</option>
              <option value="no">is already a reading</option>
            </select>
          </Choice>
          <Choice id="fmt-decimal" label="Decimal mark" reason={d.detected.decimal}>
            <select
              id="fmt-decimal"
              className="field-input"
              value={format.decimal}
              onChange={(e) => changeFormat({ ...format, decimal: e.target.value as ImportFormat['decimal'] })}
            >
              <option value=".">point (12.345)</option>
              <option value=",">comma (12,345)</option>
            </select>
          </Choice>
          <Choice id="fmt-dates" label="Dates are written" reason={d.detected.dateOrder}>
            <select
              id="fmt-dates"
              className="field-input"
              value={format.dateOrder}
              onChange={(e) => changeFormat({ ...format, dateOrder: e.target.value as ImportFormat['dateOrder'] })}
            >
              {DATE_ORDERS.map((x) => (
                <option key={x} value={x}>
                  {ORDER_LABELS[x]}
                </option>
              ))}
            </select>
          </Choice>
        </div>
        {sample.isError && <ErrorNote error={sample.error} />}
        <h3 className="mb-2 mt-2 font-semibold">Sample</h3>
        <SampleTable columns={columns} rows={view.sampleRows} />
      </section>

      <section aria-labelledby="mapping-heading" className="sheet p-5">
        <h2 id="mapping-heading" className="mb-3">
          Columns and stage
        </h2>
        {d.presets.length > 0 && (
          <div className="mb-4">
            <label htmlFor="preset" className="field-label">
              Saved mapping for files like this one
            </label>
            <select id="preset" className="field-input max-w-md" defaultValue="" onChange={(e) => applyPreset(e.target.value)}>
              <option value="">— choose to apply —</option>
              {d.presets.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </select>
          </div>
        )}
        <fieldset className="mb-4">
          <legend className="field-label">Find each reading's coupon</legend>
          <label className="mr-6 inline-flex items-center gap-2 text-sm">
            <input type="radio" value="tag" {...register('mode')} /> by a column of coupon tags
          </label>
          <label className="inline-flex items-center gap-2 text-sm">
            <input type="radio" value="sequence" {...register('mode')} /> in weighing order along a run's coupons
          </label>
        </fieldset>
        <div className="grid gap-x-6 sm:grid-cols-2">
          {mode === 'tag' ? (
            <ColumnSelect id="map-tag" label="Coupon tag" columns={columns} optional={false} register={register('tagColumn')} error={err('tagColumn')} />
          ) : (
            <div>
              <label htmlFor="map-run" className="field-label">
                Run
              </label>
              <select
                id="map-run"
                className="field-input mb-3"
                {...register('runId', { onChange: () => setOrder([]) })}
                aria-invalid={err('runId') ? true : undefined}
              >
                <option value="">— choose the run —</option>
                {runs.data?.map((r) => (
                  <option key={r.id} value={r.id}>
                    {r.code}
                  </option>
                ))}
              </select>
              {err('runId') && (
                <p role="alert" className="-mt-2 mb-3 text-sm text-margin">
                  {err('runId')}
                </p>
              )}
              {runId && <SequenceOrder runId={Number(runId)} order={order} setOrder={setOrder} />}
            </div>
          )}
          <ColumnSelect
            id="map-mass"
            label="Mass (the reading)"
            columns={columns}
            optional={false}
            register={register('massColumn')}
            error={err('massColumn')}
          />
          <ColumnSelect id="map-unit" label="Unit column" columns={columns} optional register={register('unitColumn')} />
          <div className="mb-3">
            <label htmlFor="map-fixed-unit" className="field-label">
              Unit when a reading names none
            </label>
            <select id="map-fixed-unit" className="field-input" {...register('fixedUnit')}>
              {IMPORT_MASS_UNITS.map((u) => (
                <option key={u} value={u}>
                  {u}
                </option>
              ))}
            </select>
          </div>
          <ColumnSelect id="map-date" label="Date (or date and time)" columns={columns} optional register={register('dateColumn')} />
          <ColumnSelect id="map-time" label="Time" columns={columns} optional register={register('timeColumn')} />
          <ColumnSelect id="map-stability" label="Stable/unstable flag" columns={columns} optional register={register('stabilityColumn')} />
          <div className="mb-3">
            <label htmlFor="map-stage" className="field-label">
              Stage these readings were taken at
            </label>
            <select
              id="map-stage"
              className="field-input"
              {...register('stage')}
              aria-invalid={err('stage') ? true : undefined}
              aria-describedby={err('stage') ? 'map-stage-error' : undefined}
            >
              <option value="">— choose the stage —</option>
              {WEIGHING_STAGES.map((s) => (
                <option key={s} value={s}>
                  {STAGE_LABELS[s]}
                </option>
              ))}
            </select>
            {err('stage') && (
              <p id="map-stage-error" role="alert" className="mt-1 text-sm text-margin">
                {err('stage')}
              </p>
            )}
          </div>
        </div>
        <label className="mb-3 flex items-center gap-2 text-sm">
          <input type="checkbox" {...register('includeUnstable')} /> Include readings the balance marked unstable (left out unless ticked)
        </label>
        <fieldset className="mb-3">
          <legend className="field-label">A coupon that already has a reading at this stage</legend>
          <label className="mr-6 inline-flex items-center gap-2 text-sm">
            <input type="radio" value="skip" {...register('existing')} /> leave it, skip the row
          </label>
          <label className="inline-flex items-center gap-2 text-sm">
            <input type="radio" value="correct" {...register('existing')} /> correct it with the file's value
          </label>
        </fieldset>
        {existing === 'correct' && (
          <div className="mb-3 max-w-xl">
            <label htmlFor="map-reason" className="field-label">
              Reason for the corrections (kept in each coupon's history)
            </label>
            <input id="map-reason" className="field-input" {...register('correctionReason')} aria-invalid={err('correctionReason') ? true : undefined} />
            {err('correctionReason') && (
              <p role="alert" className="mt-1 text-sm text-margin">
                {err('correctionReason')}
              </p>
            )}
          </div>
        )}
        {preview.isError && <ErrorNote error={preview.error} />}
        <button type="button" className="btn-primary" onClick={() => void onPreview()} disabled={busy}>
          Preview
        </button>
        <details className="mt-5">
          <summary className="cursor-pointer text-sm text-ink-soft">Save this mapping for the next file from the same scale</summary>
          <div className="mt-2 flex flex-wrap items-end gap-2">
            <div>
              <label htmlFor="preset-name" className="field-label">
                Name
              </label>
              <input id="preset-name" className="field-input" {...register('presetName')} aria-invalid={err('presetName') ? true : undefined} />
            </div>
            <button type="button" className="btn-quiet mb-0.5" onClick={() => void onSavePreset()} disabled={savePreset.isPending}>
              Save mapping
            </button>
          </div>
          {err('presetName') && (
            <p role="alert" className="mt-1 text-sm text-margin">
              {err('presetName')}
            </p>
          )}
          {savePreset.isError && <ErrorNote error={savePreset.error} />}
          {savePreset.isSuccess && (
            <p role="status" className="mt-1 text-sm text-ink-soft">
              Saved as “{savePreset.data.preset.name}”.
            </p>
          )}
        </details>
      </section>

      {d.status === 'previewed' && d.counts && (
        <section aria-labelledby="commit-heading" className="sheet p-5">
          <h2 id="commit-heading" className="mb-3">
            Import
          </h2>
          <fieldset className="mb-3">
            <legend className="field-label">Rows with problems</legend>
            {IMPORT_COMMIT_CHOICES.map((c) => (
              <label key={c} className="mr-6 inline-flex items-center gap-2 text-sm">
                <input type="radio" value={c} {...register('choice')} />
                {c === 'accepted-only'
                  ? `import the ${d.counts?.accepted ?? 0} accepted readings, leave the rest`
                  : 'import nothing until every problem is fixed'}
              </label>
            ))}
          </fieldset>
          {d.sameFile.length > 0 && (
            <label className="mb-3 flex items-center gap-2 text-sm">
              <input type="checkbox" {...register('again')} /> This file was imported before; import it again
            </label>
          )}
          {commit.isError && <ErrorNote error={commit.error} />}
          <button type="button" className="btn-primary" onClick={() => void onCommit()} disabled={busy}>
            Import readings
          </button>
        </section>
      )}
    </form>
  );
}

function Choice({ id, label, reason, children }: { id: string; label: string; reason: { reason: string; assumed: boolean }; children: React.ReactNode }) {
  return (
    <div className="mb-4">
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      {children}
      <p className="mt-1 text-xs text-ink-faint">
        {reason.assumed && <strong className="text-margin">Assumed: </strong>}
        {reason.reason}
      </p>
    </div>
  );
}
