import { useQueryClient } from '@tanstack/react-query';
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type ColumnDef } from '@tanstack/react-table';
import { createContext, useCallback, useContext, useEffect, useMemo, useRef, useState, type ClipboardEvent, type KeyboardEvent } from 'react';
import { Link } from 'react-router-dom';
import { sgPlausibility, sgWarningText } from '../../../../shared/coupons/plausibility';
import type { CouponOut } from '../../../../shared/schemas/coupons';
import { ApiError } from '../../../lib/api-client';
import { useMe, useRole } from '../../../lib/session';
import { useUnits } from '../../../lib/use-units';
import { queryKeys } from '../../../lib/queries/keys';
import type { GridScope } from '../api/coupons-queries';
import { useSaveMeasurements } from '../api/use-save-measurements';
import { ENTRY_COLUMNS, isLocked, rowModel, savable, showStored, storedValue, type Drafts, type RowModel } from './grid-model';
import { dropSaved, mergeRefusals, nothingSavedText, prepareSave, refusalsFrom, refusedText, replaceSaved, savedText, type CellErrors } from './save-plan';
import { useGridKeyboard } from '../hooks/use-grid-keyboard';
import { paths } from '../../../config/paths';
import { useLeaveGuard } from '../../../lib/leave-guard';
import { draftKey, useLocalDraft } from '../../../lib/local-draft';
import { parseClipboard, pasteSummary, planPaste } from './paste-plan';

interface GridState {
  drafts: Drafts;
  errors: CellErrors;
  rowErrors: Record<number, string>;
  active: { r: number; c: number };
  canEdit: boolean;
  setDraft: (couponId: number, colId: string, value: string) => void;
  setActive: (r: number, c: number) => void;
  register: (r: number, c: number, el: HTMLInputElement | null) => void;
  onKey: (e: KeyboardEvent<HTMLInputElement>, r: number, c: number) => void;
  onPaste: (e: ClipboardEvent<HTMLInputElement>, r: number, c: number) => void;
}

const GridContext = createContext<GridState | null>(null);
function useGrid(): GridState {
  const g = useContext(GridContext);
  if (!g) throw new Error('EntryCell outside EntryGrid');
  return g;
}

const cellDomId = (couponId: number, colId: string) => `cell-${couponId}-${colId}`;

function EntryCell({ model, r, c }: { model: RowModel; r: number; c: number }) {
  const g = useGrid();
  const units = useUnits();
  const col = ENTRY_COLUMNS[c];
  if (!col) return null;
  const { coupon } = model;
  const locked = isLocked(coupon, col);
  const draft = g.drafts[coupon.id]?.[col.id];
  const value = locked === 'stored' ? showStored(storedValue(coupon, col), col, units) : locked === 'control' ? '' : (draft ?? '');
  const error = model.problems[col.id] ?? g.errors[coupon.id]?.[col.id];
  const active = g.active.r === r && g.active.c === c;
  const id = cellDomId(coupon.id, col.id);
  const note = locked === 'control' ? ', not measured on a control' : locked === 'stored' ? ', saved; correct it on the coupon page' : '';
  const readOnly = locked !== null || !g.canEdit;
  return (
    <input
      ref={(el) => g.register(r, c, el)}
      id={id}
      type="text"
      inputMode="decimal"
      autoComplete="off"
      spellCheck={false}
      value={value}
      placeholder={locked === 'control' ? 'n/a' : undefined}
      readOnly={readOnly}
      aria-readonly={readOnly || undefined}
      tabIndex={active ? 0 : -1}
      aria-label={`${col.label} (${units.label(col.quantity)}), coupon ${coupon.tag}${note}`}
      aria-invalid={error ? true : undefined}
      aria-describedby={error ? `${id}-reason` : undefined}
      className={`w-[4.75rem] rounded-sm border px-1.5 py-1 text-right tabular-nums focus:outline-3 focus:outline-offset-0 focus:outline-amber-ink ${
        error
          ? 'border-margin bg-margin/10'
          : readOnly
            ? 'border-transparent bg-paper-deep text-ink-soft'
            : draft
              ? 'border-amber-ink bg-amber-light/40'
              : 'border-rule bg-white/70'
      }`}
      onChange={(e) => g.setDraft(coupon.id, col.id, e.target.value)}
      onKeyDown={(e) => g.onKey(e, r, c)}
      onFocus={(e) => {
        g.setActive(r, c);
        e.currentTarget.select();
      }}
      onPaste={(e) => g.onPaste(e, r, c)}
    />
  );
}

const fmt = (v: number | null, decimals: number) => (v === null || !Number.isFinite(v) ? '—' : v.toFixed(decimals));

function RowCheck({ model }: { model: RowModel }) {
  const g = useGrid();
  const { coupon } = model;
  const lines: { kind: 'error' | 'wait' | 'warn' | 'ok'; text: string; id?: string }[] = [];
  for (const col of ENTRY_COLUMNS) {
    const msg = model.problems[col.id] ?? g.errors[coupon.id]?.[col.id];
    if (msg) lines.push({ kind: 'error', text: `${col.label}: ${msg}`, id: `${cellDomId(coupon.id, col.id)}-reason` });
  }
  const rowError = g.rowErrors[coupon.id];
  if (rowError) lines.push({ kind: 'error', text: rowError });
  for (const text of model.incomplete) lines.push({ kind: 'wait', text });
  // The SG check runs live on what is typed (same shared rule as the server); other server warnings
  // (void fill above 100 %) and live contradictions between readings are listed too.
  const liveSg = model.metrics.drySg === null ? null : sgPlausibility(model.metrics.drySg, coupon.speciesDensity);
  const warnings = new Set([
    ...coupon.warnings.filter((w) => w.field !== 'drySg').map((w) => w.message),
    ...(liveSg && !liveSg.plausible && model.metrics.drySg !== null ? [sgWarningText(model.metrics.drySg, liveSg)] : []),
    ...model.metrics.problems.map((p) => p.message),
  ]);
  for (const text of warnings) lines.push({ kind: 'warn', text });
  if (lines.length === 0 && savable(model)) lines.push({ kind: 'ok', text: 'typed, not saved yet' });
  if (lines.length === 0) return <span className="text-ink-faint">—</span>;
  return (
    <ul className="w-[26rem] space-y-0.5 text-xs">
      {lines.map((l, i) => (
        <li key={i} id={l.id} className={l.kind === 'error' ? 'text-margin' : l.kind === 'warn' ? 'text-amber-ink' : 'text-ink-soft'}>
          <strong>{l.kind === 'error' ? 'Not saved' : l.kind === 'warn' ? 'Warning' : l.kind === 'wait' ? 'Waiting' : 'Typed'}:</strong>{' '}
          {l.kind === 'ok' ? 'not saved yet' : l.text}
        </li>
      ))}
    </ul>
  );
}

const helper = createColumnHelper<RowModel>();

function useColumns(): ColumnDef<RowModel, unknown>[] {
  const units = useUnits();
  return useMemo(() => {
    const entry = (c: number, header: string) => {
      const col = ENTRY_COLUMNS[c];
      return helper.display({
        id: col?.id ?? String(c),
        header: `${header} (${units.label(col?.quantity ?? 'mass')})`,
        cell: (ctx) => <EntryCell model={ctx.row.original} r={ctx.row.index} c={c} />,
      });
    };
    const computed = (id: string, header: string, value: (m: RowModel) => string) =>
      helper.display({ id, header, cell: (ctx) => <span className="block whitespace-nowrap text-right tabular-nums">{value(ctx.row.original)}</span> });
    return [
      helper.group({
        id: 'g-coupon',
        header: 'Coupon',
        columns: [
          helper.accessor((m) => m.coupon.tag, {
            id: 'tag',
            header: 'Tag',
            // Out of the Tab order: inside the grid, Tab moves between cells like a spreadsheet.
            cell: (ctx) => (
              <Link to={paths.coupon.href({ id: ctx.row.original.coupon.id })} tabIndex={-1} className="whitespace-nowrap">
                {ctx.row.original.coupon.tag}
              </Link>
            ),
          }),
          helper.accessor((m) => m.coupon.speciesName, {
            id: 'species',
            header: 'Species, role',
            cell: (ctx) => (
              <span className="block min-w-[6rem] text-xs">
                {ctx.row.original.coupon.speciesName}
                <br />
                <span className={ctx.row.original.coupon.role === 'control' ? 'font-semibold' : 'text-ink-soft'}>{ctx.row.original.coupon.role}</span>
              </span>
            ),
          }),
        ],
      }),
      helper.group({ id: 'g-dry', header: 'Dry', columns: [entry(0, 'Mass'), entry(1, 'Length'), entry(2, 'Width'), entry(3, 'Thickness')] }),
      helper.group({ id: 'g-soaked', header: 'Soaked', columns: [entry(4, 'Mass')] }),
      helper.group({ id: 'g-cured', header: 'Cured', columns: [entry(5, 'Mass'), entry(6, 'Length'), entry(7, 'Width'), entry(8, 'Thickness')] }),
      helper.group({
        id: 'g-computed',
        header: 'Computed',
        columns: [
          computed('mc', 'MC (%)', (m) => fmt(m.metrics.mcPct, 1)),
          computed('density', 'Dry density (kg/m³)', (m) => fmt(m.metrics.dryDensityKgM3, 0)),
          computed('sg', 'Dry SG', (m) => fmt(m.metrics.drySg, 3)),
          computed('wpg', 'WPG (%)', (m) => fmt(m.metrics.wpgPct, 1)),
          computed('loading', 'Resin loading (kg/m³)', (m) => fmt(m.metrics.resinLoadingKgM3, 0)),
          computed('voidfill', 'Void fill (%)', (m) => fmt(m.metrics.voidFillPct, 0)),
          computed('bulking', 'Bulking (%)', (m) => fmt(m.metrics.bulkingPct, 1)),
        ],
      }),
      helper.display({ id: 'check', header: 'Check', cell: (ctx) => <RowCheck model={ctx.row.original} /> }),
    ] as ColumnDef<RowModel, unknown>[];
  }, [units]);
}

const ENTRY_IDS = new Set(ENTRY_COLUMNS.map((c) => c.id));
const isEmptyDrafts = (d: Drafts) => Object.values(d).every((row) => Object.values(row ?? {}).every((v) => v === undefined || v === ''));

/**
 * The keyboard-first entry sheet for a set of coupons. Typed values stay in the grid, in display
 * units, until Save (or Ctrl+S / Cmd+S) sends every edited row in one request; the computed columns
 * follow every keystroke through the same metric functions the server uses.
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
  const qc = useQueryClient();
  const save = useSaveMeasurements();
  const [drafts, setDrafts] = useState<Drafts>({});
  const [errors, setErrors] = useState<CellErrors>({});
  const [rowErrors, setRowErrors] = useState<Record<number, string>>({});
  const [status, setStatus] = useState<{ text: string; bad: boolean } | null>(null);
  const initialRow = focus
    ? Math.max(
        0,
        coupons.findIndex((c) => c.id === focus.couponId),
      )
    : 0;
  const [active, setActiveState] = useState({ r: initialRow, c: focus?.col ?? 0 });
  const inputs = useRef(new Map<string, HTMLInputElement>());
  const saveButton = useRef<HTMLButtonElement>(null);

  const rows = useMemo(() => {
    const now = new Date().toISOString();
    return coupons.map((c) => rowModel(c, drafts[c.id], units, now));
  }, [coupons, drafts, units]);
  const rowsRef = useRef(rows);
  rowsRef.current = rows;

  const columns = useColumns();
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel(), getRowId: (m) => String(m.coupon.id) });
  const leafCount = table.getVisibleLeafColumns().length;
  const headerGroups = table.getHeaderGroups();

  const focusCell = useCallback((r: number, c: number) => {
    const el = inputs.current.get(`${r}:${c}`);
    if (!el) return;
    setActiveState({ r, c });
    el.focus();
    el.select();
  }, []);

  // A link from the bench lands on the cell it is about.
  const focused = useRef(false);
  useEffect(() => {
    if (focused.current || !focus || coupons.length === 0) return;
    focused.current = true;
    const el = inputs.current.get(`${initialRow}:${focus.col}`);
    el?.scrollIntoView({ block: 'center' });
    el?.focus();
  }, [focus, coupons.length, initialRow]);

  const setDraft = useCallback((couponId: number, colId: string, value: string) => {
    setDrafts((d) => ({ ...d, [couponId]: { ...d[couponId], [colId]: value } }));
    setErrors((e) => {
      if (!e[couponId]?.[colId]) return e;
      const row = { ...e[couponId] };
      delete row[colId];
      return { ...e, [couponId]: row };
    });
  }, []);

  const clearDraft = (couponId: number, colId: string) =>
    setDrafts((d) => {
      const row = { ...d[couponId] };
      delete row[colId];
      return { ...d, [couponId]: row };
    });

  const onKey = useGridKeyboard({
    rows: rows.length,
    cols: ENTRY_COLUMNS.length,
    pageRows: () => 10,
    hasDraft: (r, c) => {
      const coupon = rowsRef.current[r]?.coupon;
      const col = ENTRY_COLUMNS[c];
      return coupon !== undefined && col !== undefined && drafts[coupon.id]?.[col.id] !== undefined;
    },
    moveTo: focusCell,
    undo: (r, c) => {
      const coupon = rowsRef.current[r]?.coupon;
      const col = ENTRY_COLUMNS[c];
      if (coupon && col) clearDraft(coupon.id, col.id);
    },
    leave: () => saveButton.current?.focus(),
  });

  // A column copied from a spreadsheet arrives as lines (and tabs across): it fills this cell and
  // the ones below (and to the right), leaving cells that already hold a saved value alone.
  const onPaste = (e: ClipboardEvent<HTMLInputElement>, r: number, c: number) => {
    if (!canEdit) return;
    const block = parseClipboard(e.clipboardData.getData('text/plain'));
    if (!block) return;
    e.preventDefault();
    const plan = planPaste(block, r, c, { rows, columns: ENTRY_COLUMNS, locked: (model, col) => isLocked(model.coupon, col) !== null });
    const next: Drafts = { ...drafts };
    for (const { row, col, value } of plan.cells) next[row.coupon.id] = { ...next[row.coupon.id], [col.id]: value };
    setDrafts(next);
    setStatus({ text: pasteSummary(plan), bad: false });
  };

  const doSave = async () => {
    if (!canEdit || save.isPending) return;
    const sent = drafts;
    const prepared = prepareSave(rowsRef.current, new Date().toISOString());
    setErrors(prepared.refused.cells);
    setRowErrors(prepared.refused.rows);
    if (!prepared.body) {
      setStatus(nothingSavedText(prepared));
      return;
    }
    const { plan } = prepared;
    try {
      const res = await save.mutateAsync(prepared.body);
      qc.setQueryData<CouponOut[]>(queryKeys.coupons.grid(scope), (old) => (old ? replaceSaved(old, res.coupons) : old));
      setDrafts((d) => dropSaved(d, sent, plan));
      setStatus(savedText(res, plan.entries.length, prepared.held));
    } catch (err) {
      // The server writes all of a save or none of it, so nothing here was kept.
      if (err instanceof ApiError) {
        const found = refusalsFrom(
          Object.entries(err.fieldErrors).map(([k, v]) => [k, v[0] ?? err.message] as const),
          plan,
        );
        const all = mergeRefusals(prepared.refused, found);
        setErrors(all.cells);
        setRowErrors(all.rows);
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

  const pending = rows.filter((m) => m.edited).length;
  // Typed values survive a reload, a crash or a closed tab (a draft in this browser, per user and grid,
  // kept only while it was typed in the same units) and leaving asks first.
  const me = useMe();
  const restoredAt = useLocalDraft(
    draftKey(me?.id, `grid:${JSON.stringify(scope)}`),
    `${units.unit('mass')}|${units.unit('length')}`,
    drafts,
    isEmptyDrafts,
    setDrafts,
  );
  const leaveGuard = useLeaveGuard(pending > 0, `${pending} row${pending === 1 ? ' has' : 's have'} typed values that are not saved.`);

  const state: GridState = {
    drafts,
    errors,
    rowErrors,
    active,
    canEdit,
    setDraft,
    setActive: (r, c) => setActiveState((a) => (a.r === r && a.c === c ? a : { r, c })),
    register: (r, c, el) => {
      if (el) inputs.current.set(`${r}:${c}`, el);
      else inputs.current.delete(`${r}:${c}`);
    },
    onKey,
    onPaste,
  };

  const headerRows = headerGroups.length;
  return (
    <GridContext.Provider value={state}>
      {leaveGuard}
      {restoredAt && pending > 0 && (
        <p className="no-print mb-2 text-sm text-amber-ink">
          Restored values typed here on {new Date(restoredAt).toLocaleString()} and not saved yet; check them and save, or press Esc in a cell to drop one.
        </p>
      )}
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
        <p className="text-sm text-ink-soft">{pending > 0 ? `${pending} row${pending === 1 ? '' : 's'} typed, not saved.` : 'No unsaved values.'}</p>
        <p role="status" className={`text-sm ${status?.bad ? 'text-margin' : 'text-moss'}`}>
          {status?.text}
        </p>
      </div>
      <ProblemList rows={rows} errors={errors} rowErrors={rowErrors} onGo={focusCell} />
      <p id="grid-help" className="mb-2 text-xs text-ink-faint">
        Tab and Shift+Tab move across, Enter and Shift+Enter down and up, arrow keys at the edge of the text; paste a column copied from a spreadsheet into a
        cell to fill it and the cells below; Ctrl+S (⌘S) saves; Esc undoes a typed cell, or leaves the grid for the Save button. Values already saved are
        corrected on the coupon's page, with a reason.
      </p>
      {/* Wider than the page column: the grid takes the window's width so more of it shows without scrolling. */}
      <div className="relative left-1/2 w-[calc(100vw-2rem)] max-w-[120rem] -translate-x-1/2 overflow-x-auto rounded border border-paper-edge">
        <table
          role="grid"
          aria-label={caption}
          aria-describedby="grid-help"
          aria-rowcount={rows.length + headerRows}
          aria-colcount={leafCount}
          className="data-table"
        >
          <thead>
            {headerGroups.map((hg, depth) => (
              <tr key={hg.id} aria-rowindex={depth + 1}>
                {hg.headers.map((h) => {
                  // A column outside any group spans both header rows instead of leaving an empty cell.
                  if (depth > 0 && h.column.depth === 0) return null;
                  const top = depth === 0 && h.isPlaceholder;
                  const group = !h.isPlaceholder && h.subHeaders.length > 0;
                  const firstLeaf = h.getLeafHeaders()[0]?.column.id ?? h.column.id;
                  return (
                    <th
                      key={h.id}
                      scope={group ? 'colgroup' : 'col'}
                      colSpan={h.colSpan > 1 ? h.colSpan : undefined}
                      rowSpan={top ? headerRows : undefined}
                      aria-colindex={leafIndex(table, firstLeaf)}
                      className={`bg-paper-deep align-bottom ${group ? 'text-center' : 'text-xs'} ${ENTRY_IDS.has(h.column.id) ? 'text-right' : ''} ${h.column.id === 'tag' ? 'sticky left-0 z-10' : ''}`}
                    >
                      {flexRender(h.column.columnDef.header, h.getContext())}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} aria-rowindex={row.index + headerRows + 1} className={row.original.edited ? 'bg-amber-light/20' : undefined}>
                {row.getVisibleCells().map((cell, i) =>
                  cell.column.id === 'tag' ? (
                    <th
                      key={cell.id}
                      scope="row"
                      role="rowheader"
                      aria-colindex={i + 1}
                      className="sticky left-0 z-10 border-b border-paper-edge bg-paper align-top font-normal"
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </th>
                  ) : (
                    <td
                      key={cell.id}
                      role="gridcell"
                      aria-colindex={i + 1}
                      data-col={cell.column.id}
                      className={`align-top ${ENTRY_IDS.has(cell.column.id) ? 'p-0.5' : ''}`}
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ),
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </GridContext.Provider>
  );
}

/** Every value that stops a row from saving, above the grid, each one a button to its cell. */
function ProblemList({
  rows,
  errors,
  rowErrors,
  onGo,
}: {
  rows: RowModel[];
  errors: CellErrors;
  rowErrors: Record<number, string>;
  onGo: (r: number, c: number) => void;
}) {
  const items: { key: string; text: string; r: number; c: number }[] = [];
  rows.forEach((m, r) => {
    ENTRY_COLUMNS.forEach((col, c) => {
      const msg = m.problems[col.id] ?? errors[m.coupon.id]?.[col.id];
      if (msg) items.push({ key: `${m.coupon.id}-${col.id}`, text: `${m.coupon.tag}, ${col.label.toLowerCase()}: ${msg}`, r, c });
    });
    const rowMsg = rowErrors[m.coupon.id];
    if (rowMsg) items.push({ key: `${m.coupon.id}-row`, text: `${m.coupon.tag}: ${rowMsg}`, r, c: 0 });
  });
  if (items.length === 0) return null;
  return (
    <div className="mb-3 rounded border border-margin/50 bg-margin/5 px-3 py-2 text-sm">
      <p className="font-semibold text-margin">Not saved until fixed:</p>
      <ul className="mt-1 space-y-0.5">
        {items.map((i) => (
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

function leafIndex(table: { getVisibleLeafColumns: () => { id: string }[] }, id: string): number | undefined {
  const leaves = table.getVisibleLeafColumns();
  const i = leaves.findIndex((c) => c.id === id);
  if (i >= 0) return i + 1;
  return undefined;
}
