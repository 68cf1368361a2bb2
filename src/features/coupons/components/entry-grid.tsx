import { useQueryClient } from '@tanstack/react-query';
import { defaultRangeExtractor, useVirtualizer, type Range } from '@tanstack/react-virtual';
import {
  memo,
  useCallback,
  useEffect,
  useLayoutEffect,
  useMemo,
  useRef,
  useState,
  type ClipboardEvent,
  type KeyboardEvent,
  type ReactNode,
  type RefObject,
} from 'react';
import { Link } from 'react-router-dom';
import { sgPlausibility, sgWarningText } from '../../../../shared/coupons/plausibility';
import type { RunOfCoupon } from '../../../../shared/runs/contradictions';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { useLeaveGuard } from '../../../lib/leave-guard';
import { draftKey, useLocalDraft } from '../../../lib/local-draft';
import { useMe, useRole } from '../../../lib/session';
import { useUnits, type Units } from '../../../lib/use-units';
import { queryKeys } from '../../../lib/queries/keys';
import type { GridScope } from '../api/coupons-queries';
import { useSaveMeasurements } from '../api/use-save-measurements';
import { useGridContext } from '../hooks/use-grid-context';
import { useGridKeyboard } from '../hooks/use-grid-keyboard';
import { useActiveColumn, useGridDrafts, useGridSummary, useRowState } from '../hooks/use-grid-store';
import { gridEntryWarnings, rowEntryWarnings, type ConditionTag } from './grid-annotations';
import { columnIndexOf, ENTRY_COLUMNS, isLocked, savable, showStored, storedValue, type Drafts, type EntryColumn, type RowModel } from './grid-model';
import { GridStore, type RowState } from './grid-store';
import { parseClipboard, pasteSummary, planPaste } from './paste-plan';
import { BalancePanel, type BalanceOutcome } from './balance-panel';
import { dropSaved, mergeRefusals, nothingSavedText, prepareSave, refusalsFrom, refusedText, savedText } from './save-plan';

// Column widths are fixed (table-layout: fixed), so rows scrolled into view never shift the columns, and the
// sticky columns know their offsets. rem.
const W = { tag: 7, condition: 5.5, species: 8, entry: 5.25, check: 24, computed: 5 };
const HEADER_ROWS = 2;
/** Leaf columns before the entry columns: tag, condition, species. */
const LEAD = 3;

interface ComputedColumn {
  id: string;
  header: ReactNode;
  value: (m: RowModel) => string;
}

const fixed = (v: number | null, decimals: number) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(decimals));

function computedColumns(units: Units): ComputedColumn[] {
  const density = (v: number | null) => units.format(v, 'density', false);
  return [
    {
      id: 'mc',
      header: (
        <>
          <abbr title="Moisture content: the first drying-check weighing against the dry mass, as % of the dry mass (a meter reading when one was taken instead)">
            MC
          </abbr>{' '}
          (% of dry mass)
        </>
      ),
      value: (m) => fixed(m.metrics.mcPct, 1),
    },
    { id: 'density', header: `Dry density (${units.label('density')})`, value: (m) => density(m.metrics.dryDensityKgM3) },
    { id: 'sg', header: 'Dry SG', value: (m) => fixed(m.metrics.drySg, 3) },
    { id: 'wpg', header: 'WPG (%)', value: (m) => fixed(m.metrics.wpgPct, 1) },
    { id: 'loading', header: `Resin loading (${units.label('density')})`, value: (m) => density(m.metrics.resinLoadingKgM3) },
    { id: 'voidfill', header: 'Void fill (%)', value: (m) => fixed(m.metrics.voidFillPct, 0) },
    { id: 'bulking', header: 'Bulking (%)', value: (m) => fixed(m.metrics.bulkingPct, 1) },
  ];
}

/** Offset from the right edge of the computed column `i` of `n`, for the columns that stay in view. */
const rightOf = (i: number, n: number) => `${(n - 1 - i) * W.computed}rem`;
// The computed columns stay in view on a wide screen only: on a phone they would cover the whole grid.
const STICKY_RIGHT = 'lg:sticky';

const cellDomId = (couponId: number, colId: string) => `cell-${couponId}-${colId}`;

/** What every row shares; one object for the grid's life (until units or the context data change). */
interface GridCtx {
  store: GridStore;
  canEdit: boolean;
  units: Units;
  computed: ComputedColumn[];
  conditions: Map<number, ConditionTag>;
  runs: Map<number, RunOfCoupon>;
  onKey: (e: KeyboardEvent<HTMLInputElement>, r: number, c: number) => void;
  onPaste: (e: ClipboardEvent<HTMLInputElement>, r: number, c: number) => void;
  onFocusCell: (r: number, c: number) => void;
  register: (r: number, c: number, el: HTMLInputElement | null) => void;
  measure: (el: HTMLTableRowElement | null) => void;
}

interface EntryCellProps {
  ctx: GridCtx;
  couponId: number;
  colId: string;
  r: number;
  c: number;
  value: string;
  label: string;
  placeholder: string | undefined;
  readOnly: boolean;
  active: boolean;
  invalid: boolean;
  typed: boolean;
}

/** One text box; its props are plain values, so it re-renders only when its own value or state changes. */
const EntryCell = memo(function EntryCell({ ctx, couponId, colId, r, c, value, label, placeholder, readOnly, active, invalid, typed }: EntryCellProps) {
  const id = cellDomId(couponId, colId);
  return (
    <input
      ref={(el) => ctx.register(r, c, el)}
      id={id}
      type="text"
      inputMode="decimal"
      autoComplete="off"
      spellCheck={false}
      value={value}
      placeholder={placeholder}
      readOnly={readOnly}
      aria-readonly={readOnly || undefined}
      tabIndex={active ? 0 : -1}
      aria-label={label}
      aria-invalid={invalid || undefined}
      aria-describedby={invalid ? `${id}-reason` : undefined}
      className={`w-[4.75rem] rounded-sm border px-1.5 py-1 text-right tabular-nums focus:outline-3 focus:outline-offset-0 focus:outline-amber-ink ${
        invalid
          ? 'border-margin bg-margin/10'
          : readOnly
            ? 'border-transparent bg-paper-deep text-ink-soft'
            : typed
              ? 'border-amber-ink bg-amber-light/40'
              : 'border-rule bg-white/70'
      }`}
      onChange={(e) => ctx.store.setDraft(couponId, colId, e.target.value)}
      onKeyDown={(e) => ctx.onKey(e, r, c)}
      onFocus={(e) => {
        ctx.onFocusCell(r, c);
        e.currentTarget.select();
      }}
      onPaste={(e) => ctx.onPaste(e, r, c)}
    />
  );
});

function cellProps(ctx: GridCtx, state: RowState, col: EntryColumn, r: number, c: number, activeCol: number): Omit<EntryCellProps, 'ctx'> {
  const { coupon } = state.model;
  const locked = isLocked(coupon, col);
  const draft = state.draft?.[col.id];
  const note = locked === 'control' ? ', not measured on a control' : locked === 'stored' ? ', saved; correct it on the coupon page' : '';
  return {
    couponId: coupon.id,
    colId: col.id,
    r,
    c,
    value: locked === 'stored' ? showStored(storedValue(coupon, col), col, ctx.units) : locked === 'control' ? '' : (draft ?? ''),
    label: `${col.label} (${ctx.units.label(col.quantity)}), coupon ${coupon.tag}${note}`,
    placeholder: locked === 'control' ? 'n/a' : undefined,
    readOnly: locked !== null || !ctx.canEdit,
    active: activeCol === c,
    invalid: (state.model.problems[col.id] ?? state.errors?.[col.id]) !== undefined,
    typed: Boolean(draft),
  };
}

/** One coupon's row: re-renders when its own drafts, refusals or active cell change; its computed columns follow. */
const GridRow = memo(function GridRow({ ctx, coupon, r }: { ctx: GridCtx; coupon: CouponOut; r: number }) {
  const state = useRowState(ctx.store, coupon);
  const activeCol = useActiveColumn(ctx.store, r);
  const { model } = state;
  const condition = coupon.conditionId === null ? undefined : ctx.conditions.get(coupon.conditionId);
  const n = ctx.computed.length;
  return (
    <tr ref={ctx.measure} data-index={r} aria-rowindex={r + HEADER_ROWS + 1} className={model.edited ? 'bg-amber-light/20' : undefined}>
      <th scope="row" role="rowheader" aria-colindex={1} className="sticky left-0 z-10 border-b border-paper-edge bg-paper align-top font-normal">
        {/* Out of the Tab order: inside the grid, Tab moves between cells like a spreadsheet. */}
        <Link to={paths.coupon.href({ id: coupon.id })} tabIndex={-1} title={coupon.tag} className="block break-all sm:truncate">
          {coupon.tag}
        </Link>
      </th>
      <td role="gridcell" aria-colindex={2} data-col="condition" className="align-top text-xs">
        {condition ? (
          <>
            <span title={condition.label}>{condition.code}</span>
            <span className="sr-only">: {condition.name}</span>
          </>
        ) : (
          <span className="text-ink-soft">{coupon.role === 'control' ? 'control' : '—'}</span>
        )}
      </td>
      <td role="gridcell" aria-colindex={3} data-col="species" className="align-top text-xs">
        {coupon.speciesName}
        <br />
        <span className={coupon.role === 'control' ? 'font-semibold' : 'text-ink-soft'}>{coupon.role}</span>
      </td>
      {ENTRY_COLUMNS.map((col, c) => (
        <td key={col.id} role="gridcell" aria-colindex={LEAD + c + 1} data-col={col.id} className="p-0.5 align-top">
          <EntryCell ctx={ctx} {...cellProps(ctx, state, col, r, c, activeCol)} />
        </td>
      ))}
      <td role="gridcell" aria-colindex={LEAD + ENTRY_COLUMNS.length + 1} data-col="check" className="align-top">
        <RowCheck state={state} run={coupon.runId === null ? null : ctx.runs.get(coupon.runId)} />
      </td>
      {ctx.computed.map((col, i) => (
        <td
          key={col.id}
          role="gridcell"
          aria-colindex={LEAD + ENTRY_COLUMNS.length + 2 + i}
          data-col={col.id}
          className={`${STICKY_RIGHT} z-10 bg-paper text-right whitespace-nowrap tabular-nums align-top ${i === 0 ? 'lg:border-l lg:border-l-rule' : ''}`}
          style={{ right: rightOf(i, n) }}
        >
          {col.value(model)}
        </td>
      ))}
    </tr>
  );
});

function RowCheck({ state, run }: { state: RowState; run: RunOfCoupon | null | undefined }) {
  const { model, errors, rowError } = state;
  const { coupon } = model;
  const lines: { kind: 'error' | 'wait' | 'warn' | 'ok'; text: string; id?: string }[] = [];
  for (const col of ENTRY_COLUMNS) {
    const msg = model.problems[col.id] ?? errors?.[col.id];
    if (msg) lines.push({ kind: 'error', text: `${col.label}: ${msg}`, id: `${cellDomId(coupon.id, col.id)}-reason` });
  }
  if (rowError) lines.push({ kind: 'error', text: rowError });
  for (const text of model.incomplete) lines.push({ kind: 'wait', text });
  // The SG check runs live on what is typed (same shared rule as the server); other server warnings
  // (void fill above 100 %) and live contradictions between readings are listed too.
  const liveSg = model.metrics.drySg === null ? null : sgPlausibility(model.metrics.drySg, coupon.speciesDensity);
  const warnings = new Set([
    ...coupon.warnings.filter((w) => w.field !== 'drySg').map((w) => w.message),
    ...(liveSg && !liveSg.plausible && model.metrics.drySg !== null ? [sgWarningText(model.metrics.drySg, liveSg)] : []),
    ...model.metrics.problems.map((p) => p.message),
    // A weighing the run's recorded stages contradict: said now, and saving it stays allowed on purpose.
    ...rowEntryWarnings(model, run, new Date().toISOString()).map((m) => `${m} It can still be saved.`),
  ]);
  for (const text of warnings) lines.push({ kind: 'warn', text });
  if (lines.length === 0 && savable(model)) lines.push({ kind: 'ok', text: 'typed, not saved yet' });
  if (lines.length === 0) return <span className="text-ink-faint">—</span>;
  return (
    <ul className="space-y-0.5 text-xs">
      {lines.map((l, i) => (
        <li key={i} id={l.id} className={l.kind === 'error' ? 'text-margin' : l.kind === 'warn' ? 'text-amber-ink' : 'text-ink-soft'}>
          <strong>{l.kind === 'error' ? 'Not saved' : l.kind === 'warn' ? 'Warning' : l.kind === 'wait' ? 'Waiting' : 'Typed'}:</strong>{' '}
          {l.kind === 'ok' ? 'not saved yet' : l.text}
        </li>
      ))}
    </ul>
  );
}

const isEmptyDrafts = (d: Drafts) => Object.values(d).every((row) => Object.values(row ?? {}).every((v) => v === undefined || v === ''));

/**
 * The keyboard-first entry sheet for a set of coupons. Typed values stay in the grid, in display units,
 * until Save (or Ctrl+S / Cmd+S) sends every edited row in one request; the computed columns follow every
 * keystroke through the same metric functions the server uses. Typed state lives in a store outside React
 * (one subscription per row), and only the rows in view (plus the active one) are in the page.
 */
export function EntryGrid({
  coupons,
  scope,
  caption,
  focus,
}: {
  coupons: CouponOut[];
  scope: GridScope;
  caption: string;
  focus?: { couponId: number; col: number } | null;
}) {
  const units = useUnits();
  const { can } = useRole();
  const canEdit = can('technician');
  const save = useSaveMeasurements();
  const qc = useQueryClient();
  const [status, setStatus] = useState<{ text: string; bad: boolean } | null>(null);
  const [store] = useState(() => {
    const r = focus
      ? Math.max(
          0,
          coupons.findIndex((c) => c.id === focus.couponId),
        )
      : 0;
    return new GridStore(coupons, units, { r, c: focus?.col ?? 0 });
  });
  // New query data (a save, a refetch) and a change of units reach the store as the grid renders; the rows
  // render then anyway, and each row's snapshot notices its new coupon object or the new units.
  store.setCoupons(coupons);
  store.setUnits(units);

  const { conditions, runs } = useGridContext(coupons);
  const computed = useMemo(() => computedColumns(units), [units]);

  const scrollRef = useRef<HTMLDivElement>(null);
  const headRef = useRef<HTMLTableSectionElement>(null);
  const saveButton = useRef<HTMLButtonElement>(null);
  const inputs = useRef(new Map<string, HTMLInputElement>());
  /** A cell to focus as soon as its row is rendered (it was scrolled to). */
  const pendingFocus = useRef<{ r: number; c: number } | null>(null);
  const [headHeight, setHeadHeight] = useState(64);
  useLayoutEffect(() => {
    const h = headRef.current?.offsetHeight;
    if (h && h !== headHeight) setHeadHeight(h);
  }, [headHeight]);

  // The active row stays in the page while it is scrolled out of view, so focus is never lost with it.
  const rangeExtractor = useCallback(
    (range: Range) => {
      const indexes = defaultRangeExtractor(range);
      const { r } = store.active();
      if (r < range.count && !indexes.includes(r)) indexes.push(r);
      return indexes.sort((a, b) => a - b);
    },
    [store],
  );
  const virtualizer = useVirtualizer({
    count: coupons.length,
    getScrollElement: () => scrollRef.current,
    estimateSize: () => 46,
    overscan: 6,
    paddingStart: headHeight,
    scrollPaddingStart: headHeight,
    rangeExtractor,
    getItemKey: (i) => coupons[i]?.id ?? i,
  });

  const focusCell = useCallback(
    (r: number, c: number) => {
      store.setActive(r, c);
      const el = inputs.current.get(`${r}:${c}`);
      if (el) {
        el.focus({ preventScroll: true });
        el.select();
        // The container's scroll padding keeps the cell clear of the sticky header and columns.
        el.scrollIntoView({ block: 'nearest', inline: 'nearest' });
        return;
      }
      pendingFocus.current = { r, c };
      virtualizer.scrollToIndex(r, { align: 'auto' });
    },
    [store, virtualizer],
  );

  const register = useCallback((r: number, c: number, el: HTMLInputElement | null) => {
    const key = `${r}:${c}`;
    if (!el) {
      inputs.current.delete(key);
      return;
    }
    inputs.current.set(key, el);
    const p = pendingFocus.current;
    if (p && p.r === r && p.c === c) {
      pendingFocus.current = null;
      el.focus({ preventScroll: true });
      el.select();
      el.scrollIntoView({ block: 'nearest', inline: 'nearest' });
    }
  }, []);

  // A link from the bench lands on the cell it is about.
  const focused = useRef(false);
  useEffect(() => {
    if (focused.current || !focus || coupons.length === 0) return;
    focused.current = true;
    const { r, c } = store.active();
    pendingFocus.current = { r, c };
    virtualizer.scrollToIndex(r, { align: 'center' });
    const el = inputs.current.get(`${r}:${c}`);
    if (el) register(r, c, el);
  }, [focus, coupons.length, store, virtualizer, register]);

  const onKey = useGridKeyboard({
    rows: coupons.length,
    cols: ENTRY_COLUMNS.length,
    pageRows: () => Math.max(1, Math.floor(((scrollRef.current?.clientHeight ?? 480) - headHeight) / 46) - 1),
    hasDraft: (r, c) => {
      const coupon = coupons[r];
      const col = ENTRY_COLUMNS[c];
      return coupon !== undefined && col !== undefined && store.draft(coupon.id, col.id) !== undefined;
    },
    moveTo: focusCell,
    undo: (r, c) => {
      const coupon = coupons[r];
      const col = ENTRY_COLUMNS[c];
      if (coupon && col) store.clearDraft(coupon.id, col.id);
    },
    leave: () => saveButton.current?.focus(),
  });

  // A block copied from a spreadsheet arrives as lines (and tabs across): it fills this cell and the ones
  // below (and to the right), leaving cells that already hold a saved value alone.
  const canEditRef = useRef(canEdit);
  canEditRef.current = canEdit;
  const onPaste = useCallback(
    (e: ClipboardEvent<HTMLInputElement>, r: number, c: number) => {
      if (!canEditRef.current) return;
      const block = parseClipboard(e.clipboardData.getData('text/plain'));
      if (!block) return;
      e.preventDefault();
      const plan = planPaste(block, r, c, { rows: store.coupons, columns: ENTRY_COLUMNS, locked: (coupon, col) => isLocked(coupon, col) !== null });
      store.setDrafts((d) => {
        const next: Drafts = { ...d };
        for (const { row, col, value } of plan.cells) next[row.id] = { ...next[row.id], [col.id]: value };
        return next;
      });
      setStatus({ text: pasteSummary(plan), bad: false });
    },
    [store],
  );

  // A settled reading from a balance on a serial port: typed into the selected mass cell (in the user's mass
  // unit, as if keyed in), then the cell below is selected, so a column is weighed coupon after coupon.
  const takeBalanceMass = useCallback(
    (grams: number, printed: string): BalanceOutcome => {
      const { r, c } = store.active();
      const coupon = store.coupons[r];
      const col = ENTRY_COLUMNS[c];
      if (!coupon || !col) return { text: `${printed}: not written; select a mass cell first.`, bad: true };
      if (col.quantity !== 'mass') return { text: `${printed}: not written; the selected cell is ${col.label.toLowerCase()}, select a mass cell.`, bad: true };
      const locked = isLocked(coupon, col);
      if (locked)
        return {
          text: `${printed}: not written; ${coupon.tag} ${locked === 'control' ? `is a control, with no ${col.label.toLowerCase()}` : `already has its ${col.label.toLowerCase()} saved (correct it on the coupon's page)`}.`,
          bad: true,
        };
      const shown = String(Number(units.toDisplay(grams, 'mass').toPrecision(7)));
      store.setDraft(coupon.id, col.id, shown);
      const last = r >= store.coupons.length - 1;
      if (!last) focusCell(r + 1, c);
      return {
        text: `${printed} → ${coupon.tag}, ${col.label.toLowerCase()}: ${shown} ${units.label('mass')}${last ? ' (the last coupon of the grid)' : ''}. Not saved yet.`,
        bad: false,
      };
    },
    [store, units, focusCell],
  );

  const doSave = async () => {
    if (!canEdit || save.isPending) return;
    const sent = store.drafts();
    const prepared = prepareSave(store.models(), new Date().toISOString());
    store.setRefusals(prepared.refused.cells, prepared.refused.rows);
    if (!prepared.body) {
      setStatus(nothingSavedText(prepared));
      return;
    }
    const { plan } = prepared;
    try {
      // The answer's coupons replace their rows in every grid showing them (in the mutation's onSuccess).
      const res = await save.mutateAsync(prepared.body);
      store.setDrafts((d) => dropSaved(d, sent, plan));
      setStatus(savedText(res, plan.entries.length, prepared.held));
    } catch (err) {
      // The server writes all of a save or none of it, so nothing here was kept.
      if (err instanceof ApiError) {
        const found = refusalsFrom(
          Object.entries(err.fieldErrors).map(([k, v]) => [k, v[0] ?? err.message] as const),
          plan,
        );
        const all = mergeRefusals(prepared.refused, found);
        store.setRefusals(all.cells, all.rows);
        setStatus({ text: refusedText(err.message), bad: true });
        // Someone else saved a reading meanwhile: show it, so the conflict can be seen and corrected.
        if (err.status === 409) void qc.invalidateQueries({ queryKey: queryKeys.coupons.grid(scope) });
      } else {
        setStatus({ text: 'Nothing saved: something went wrong; try again.', bad: true });
      }
    }
  };
  const saveRef = useRef(doSave);
  saveRef.current = doSave;

  useEffect(() => {
    const onKeyDown = (e: globalThis.KeyboardEvent) => {
      if ((e.ctrlKey || e.metaKey) && !e.altKey && e.key.toLowerCase() === 's') {
        e.preventDefault();
        void saveRef.current();
      }
    };
    window.addEventListener('keydown', onKeyDown);
    return () => window.removeEventListener('keydown', onKeyDown);
  }, []);

  const onFocusCell = useCallback((r: number, c: number) => store.setActive(r, c), [store]);
  const ctx = useMemo<GridCtx>(
    () => ({ store, canEdit, units, computed, conditions, runs, onKey, onPaste, onFocusCell, register, measure: virtualizer.measureElement }),
    [store, canEdit, units, computed, conditions, runs, onKey, onPaste, onFocusCell, register, virtualizer.measureElement],
  );

  const leafCount = LEAD + ENTRY_COLUMNS.length + 1 + computed.length;
  const items = virtualizer.getVirtualItems();
  const total = virtualizer.getTotalSize();
  const body: ReactNode[] = [];
  let cursor = headHeight;
  for (const item of items) {
    const coupon = coupons[item.index];
    if (!coupon) continue;
    if (item.start > cursor) body.push(<Spacer key={`gap-${item.index}`} height={item.start - cursor} span={leafCount} />);
    body.push(<GridRow key={coupon.id} ctx={ctx} coupon={coupon} r={item.index} />);
    cursor = Math.max(cursor, item.end);
  }
  if (total > cursor) body.push(<Spacer key="gap-end" height={total - cursor} span={leafCount} />);

  const tableWidth = W.tag + W.condition + W.species + ENTRY_COLUMNS.length * W.entry + W.check + computed.length * W.computed;
  const conditionKey = [...new Map([...conditions.values()].map((t) => [t.code, t])).values()];
  return (
    <>
      <GridDrafts store={store} scope={scope} units={units} />
      <div className="no-print mb-3 flex flex-wrap items-center gap-3">
        {canEdit && (
          <button
            ref={saveButton}
            type="button"
            className="btn-primary"
            onClick={() => void doSave()}
            disabled={save.isPending}
            aria-keyshortcuts="Control+S Meta+S"
          >
            {save.isPending ? 'Saving…' : 'Save'}
          </button>
        )}
        <PendingNote store={store} />
        <p role="status" className={`text-sm ${status?.bad ? 'text-margin' : 'text-moss'}`}>
          {status?.text}
        </p>
      </div>
      {canEdit && <BalancePanel onMass={takeBalanceMass} />}
      <ProblemList store={store} onGo={focusCell} />
      <WarningList store={store} runs={runs} onGo={focusCell} />
      <p id="grid-help" className="mb-2 text-xs text-ink-faint">
        Tab and Shift+Tab move across, Enter and Shift+Enter down and up, arrow keys, Home and End at the edge of the text, Page Up and Page Down by a
        screenful, Ctrl+Home and Ctrl+End to the first and last cell; paste a block copied from a spreadsheet into a cell to fill it and the cells below; Ctrl+S
        (⌘S) saves; Esc undoes a typed cell, or leaves the grid for the Save button. Values already saved are corrected on the coupon's page, with a reason.
      </p>
      {conditionKey.length > 0 && (
        <dl className="mb-2 flex flex-wrap gap-x-4 gap-y-0.5 text-xs" aria-label="Conditions (resin and process settings)">
          {conditionKey.map((t) => (
            <div key={t.code} className="flex gap-1">
              <dt className="font-semibold">{t.code}</dt>
              <dd>{t.label}</dd>
            </div>
          ))}
        </dl>
      )}
      {/* Wider than the page column: the grid takes the window's width, and scrolls inside its own box with the
          header, the tag and (on a wide screen) the computed columns kept in view. */}
      <div
        ref={scrollRef}
        className="relative left-1/2 max-h-[calc(100vh-7rem)] min-h-[16rem] w-[calc(100vw-2rem)] max-w-[120rem] -translate-x-1/2 scroll-pl-[7rem] overflow-auto sm:scroll-pl-[11rem] rounded border border-paper-edge lg:scroll-pr-[35rem]"
        style={{ scrollPaddingTop: headHeight }}
      >
        <table
          role="grid"
          aria-label={caption}
          aria-describedby="grid-help"
          aria-rowcount={coupons.length + HEADER_ROWS}
          aria-colcount={leafCount}
          className="data-table table-fixed"
          style={{ width: `${tableWidth}rem` }}
        >
          <colgroup>
            {/* The tag column is narrower on a phone, where it would otherwise take half the screen. */}
            <col className="w-[7rem] sm:w-[11rem]" />
            <col style={{ width: `${W.condition}rem` }} />
            <col style={{ width: `${W.species}rem` }} />
            {ENTRY_COLUMNS.map((c) => (
              <col key={c.id} style={{ width: `${W.entry}rem` }} />
            ))}
            <col style={{ width: `${W.check}rem` }} />
            {computed.map((c) => (
              <col key={c.id} style={{ width: `${W.computed}rem` }} />
            ))}
          </colgroup>
          <GridHead headRef={headRef} units={units} computed={computed} />
          <tbody>{body}</tbody>
        </table>
      </div>
    </>
  );
}

function Spacer({ height, span }: { height: number; span: number }) {
  return (
    <tr aria-hidden="true">
      <td colSpan={span} style={{ height, padding: 0, border: 0 }} />
    </tr>
  );
}

const GridHead = memo(function GridHead({
  headRef,
  units,
  computed,
}: {
  headRef: RefObject<HTMLTableSectionElement | null>;
  units: Units;
  computed: ComputedColumn[];
}) {
  // Only the entry columns are grouped by stage. The other headers span both header rows, so a header that
  // stays in view (the tag, the computed columns) never sits under another column's group label.
  const group = (label: string, span: number, colIndex: number) => (
    <th scope="colgroup" colSpan={span} aria-colindex={colIndex} className="bg-paper-deep text-center">
      {label}
    </th>
  );
  const whole = (label: ReactNode, colIndex: number, extra = '') => (
    <th scope="col" rowSpan={HEADER_ROWS} aria-colindex={colIndex} className={`bg-paper-deep align-bottom text-xs ${extra}`}>
      {label}
    </th>
  );
  const checkIndex = LEAD + ENTRY_COLUMNS.length + 1;
  const n = computed.length;
  return (
    <thead ref={headRef} className="sticky top-0 z-20">
      <tr aria-rowindex={1}>
        {whole('Tag', 1, 'sticky left-0 z-10')}
        {whole('Condition', 2)}
        {whole('Species, role', 3)}
        {group('Dry', 4, LEAD + 1)}
        {group('Soaked', 1, LEAD + 5)}
        {group('Cured', 4, LEAD + 6)}
        {whole('Check', checkIndex)}
        {computed.map((col, i) => (
          <th
            key={col.id}
            scope="col"
            rowSpan={HEADER_ROWS}
            aria-colindex={checkIndex + 1 + i}
            className={`${STICKY_RIGHT} bg-paper-deep text-right align-bottom text-xs ${i === 0 ? 'lg:border-l lg:border-l-rule' : ''}`}
            style={{ right: rightOf(i, n) }}
          >
            {col.header}
          </th>
        ))}
      </tr>
      <tr aria-rowindex={2}>
        {ENTRY_COLUMNS.map((col, c) => (
          <th key={col.id} scope="col" aria-colindex={LEAD + c + 1} className="bg-paper-deep text-right align-bottom text-xs">
            {col.label.replace(/^(Dry|Soaked|Cured) /, '').replace(/^./, (x) => x.toUpperCase())} ({units.label(col.quantity)})
          </th>
        ))}
      </tr>
    </thead>
  );
});

/** Keeps typed values through a reload, a crash or a closed tab (a draft in this browser, per user and grid, kept only while typed in the same units), and asks before leaving. */
function GridDrafts({ store, scope, units }: { store: GridStore; scope: GridScope; units: Units }) {
  const drafts = useGridDrafts(store);
  const { pending } = useGridSummary(store);
  const me = useMe();
  const restore = useCallback((d: Drafts) => store.setDrafts(d), [store]);
  const restoredAt = useLocalDraft(
    draftKey(me?.id, `grid:${JSON.stringify(scope)}`),
    `${units.unit('mass')}|${units.unit('length')}`,
    drafts,
    isEmptyDrafts,
    restore,
  );
  const leaveGuard = useLeaveGuard(pending > 0, `${pending} row${pending === 1 ? ' has' : 's have'} typed values that are not saved.`);
  return (
    <>
      {leaveGuard}
      {restoredAt && pending > 0 && (
        <p className="no-print mb-2 text-sm text-amber-ink">
          Restored values typed here on {new Date(restoredAt).toLocaleString()} and not saved yet; check them and save, or press Esc in a cell to drop one.
        </p>
      )}
    </>
  );
}

function PendingNote({ store }: { store: GridStore }) {
  const { pending } = useGridSummary(store);
  return <p className="text-sm text-ink-soft">{pending > 0 ? `${pending} row${pending === 1 ? '' : 's'} typed, not saved.` : 'No unsaved values.'}</p>;
}

/** Every value that stops a row from saving, above the grid, each one a button to its cell. */
function ProblemList({ store, onGo }: { store: GridStore; onGo: (r: number, c: number) => void }) {
  const { problems } = useGridSummary(store);
  if (problems.length === 0) return null;
  return (
    <div className="mb-3 rounded border border-margin/50 bg-margin/5 px-3 py-2 text-sm">
      <p className="font-semibold text-margin">Not saved until fixed:</p>
      <ul className="mt-1 space-y-0.5">
        {problems.map((i) => (
          <li key={i.key}>
            <button type="button" className="text-left text-margin underline decoration-margin/40 underline-offset-2" onClick={() => onGo(i.r, i.c)}>
              {i.text}
            </button>
          </li>
        ))}
      </ul>
    </div>
  );
}

/**
 * Typed weighings the runs' recorded stages contradict, grouped, above the grid: the row's own note may be out
 * of view while typing. A warning only: the save goes ahead if the user means it.
 */
function WarningList({ store, runs, onGo }: { store: GridStore; runs: Map<number, RunOfCoupon>; onGo: (r: number, c: number) => void }) {
  const drafts = useGridDrafts(store);
  const warnings = useMemo(() => {
    const typed = Object.keys(drafts)
      .map((id) => store.coupons[store.indexOf(Number(id))])
      .filter((c): c is CouponOut => c !== undefined)
      .map((c) => store.row(c).model);
    return gridEntryWarnings(typed, (c) => (c.runId === null ? null : runs.get(c.runId)), new Date().toISOString());
  }, [drafts, runs, store]);
  if (warnings.length === 0) return null;
  const go = (couponId: number, columnId: string) => {
    const r = store.indexOf(couponId);
    if (r >= 0) onGo(r, columnIndexOf(columnId));
  };
  return (
    <div className="mb-3 rounded border border-amber-ink/50 bg-amber-light/20 px-3 py-2 text-sm">
      <p className="font-semibold text-amber-ink">Check before saving (saving is still allowed):</p>
      <ul className="mt-1 space-y-0.5">
        {warnings.map((w) => (
          <li key={`${w.code}-${w.couponIds.join(',')}-${w.message}`}>
            {w.message}{' '}
            <button
              type="button"
              className="text-amber-ink underline decoration-amber-ink/40 underline-offset-2"
              onClick={() => go(w.couponIds[0]!, w.columnId)}
            >
              Go to {store.coupons[store.indexOf(w.couponIds[0]!)]?.tag ?? 'the coupon'}
            </button>
          </li>
        ))}
      </ul>
    </div>
  );
}
