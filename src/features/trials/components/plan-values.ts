import type { FieldErrors } from 'react-hook-form';
import { createTrialSchema, type ConditionInput, type Trial } from '../../../../shared/schemas/trials';

/** One row of process settings as typed: temperature and thickness in the user's units. */
export interface ProcessRow {
  processLabel: string;
  vacuumMinutes: number | null;
  soakMinutes: number | null;
  cureTemp: number | null;
  cureMinutes: number | null;
  thickness: number | null;
  /** Coupons per species × resin cell for this process (key from `cellKey`); null plans the default. */
  cells: Record<string, number | null>;
}

export interface PlanValues {
  title: string;
  question: string;
  controlsPerSpecies: number | null;
  notes: string | null;
  speciesIds: string[];
  resinIds: string[];
  /** What an empty cell plans. */
  couponsPerCondition: number | null;
  processes: ProcessRow[];
  /** Not a box: carries the error about the grid as a whole. */
  grid?: string;
}

export const cellKey = (speciesId: number | string, resinId: number | string) => `s${speciesId}r${resinId}`;

export interface Converters {
  tempToC: (v: number) => number;
  lengthToMm: (v: number) => number;
}

/** Where each condition of the request came from, so an error about condition i lands on its box. */
interface Origin {
  process: number;
  cell: string;
  ownCount: boolean;
}

export interface BuiltPlan {
  input: {
    title: string;
    question: string;
    controlsPerSpecies: number | undefined;
    notes: string | null;
    conditions: Partial<ConditionInput>[];
  };
  origins: Origin[];
}

const blankToUndefined = (v: number | null) => (v === null || Number.isNaN(v) ? undefined : v);

/** The typed plan → the contract's request body: species × resin × process settings, empty cells at the default, 0 left out. */
export function buildPlan(v: PlanValues, conv: Converters): BuiltPlan {
  const conditions: Partial<ConditionInput>[] = [];
  const origins: Origin[] = [];
  for (const s of v.speciesIds) {
    for (const r of v.resinIds) {
      v.processes.forEach((p, pi) => {
        const key = cellKey(s, r);
        const own = p.cells?.[key];
        const ownCount = own !== null && own !== undefined && !Number.isNaN(own);
        const count = ownCount ? own : blankToUndefined(v.couponsPerCondition);
        if (count === 0) return;
        conditions.push({
          speciesId: Number(s),
          resinId: Number(r),
          processLabel: p.processLabel,
          vacuumMinutes: p.vacuumMinutes,
          soakMinutes: p.soakMinutes,
          cureTempC: p.cureTemp === null ? null : conv.tempToC(p.cureTemp),
          cureMinutes: p.cureMinutes,
          thicknessMm: p.thickness === null ? null : conv.lengthToMm(p.thickness),
          couponsWanted: count,
        });
        origins.push({ process: pi, cell: key, ownCount });
      });
    }
  }
  return {
    input: {
      title: v.title,
      question: v.question,
      controlsPerSpecies: blankToUndefined(v.controlsPerSpecies),
      notes: v.notes,
      conditions,
    },
    origins,
  };
}

const PROCESS_FIELDS: Record<string, string> = {
  processLabel: 'processLabel',
  vacuumMinutes: 'vacuumMinutes',
  soakMinutes: 'soakMinutes',
  cureTempC: 'cureTemp',
  cureMinutes: 'cureMinutes',
  thicknessMm: 'thickness',
};

/** A contract field path ("conditions.3.cureTempC") → the form box it was typed in. */
export function formFieldOf(path: string, origins: readonly Origin[]): string {
  const [head, index, field] = path.split('.');
  if (head !== 'conditions') return head === '_' || !head ? 'grid' : path;
  if (index === undefined) return 'grid';
  const o = origins[Number(index)];
  if (!o || field === undefined) return 'grid';
  if (field === 'speciesId') return 'speciesIds';
  if (field === 'resinId') return 'resinIds';
  if (field === 'couponsWanted') return o.ownCount ? `processes.${o.process}.cells.${o.cell}` : 'couponsPerCondition';
  const f = PROCESS_FIELDS[field];
  return f ? `processes.${o.process}.${f}` : 'grid';
}

function setPath(target: Record<string, unknown>, path: string, value: unknown) {
  const parts = path.split('.');
  let node: Record<string, unknown> = target;
  parts.forEach((part, i) => {
    if (i === parts.length - 1) {
      node[part] ??= value;
      return;
    }
    const nextIsIndex = /^\d+$/.test(parts[i + 1] ?? '');
    node[part] ??= nextIsIndex ? [] : {};
    node = node[part] as Record<string, unknown>;
  });
}

function hasDuplicateLabels(v: PlanValues): boolean {
  const names = v.processes.map((p) => p.processLabel.trim().toLowerCase());
  return new Set(names).size !== names.length;
}

/** Checks the built plan with the same contract the server uses; errors come back on the form's boxes. */
export function checkPlan(v: PlanValues, conv: Converters) {
  const built = buildPlan(v, conv);
  const result = createTrialSchema.safeParse(built.input);
  if (result.success && !hasDuplicateLabels(v)) return { ok: true as const, data: result.data, built };
  const errors: Record<string, unknown> = {};
  // Said here in the form's own terms; the contract would name a condition number the user never sees.
  const seen = new Map<string, number>();
  v.processes.forEach((p, i) => {
    const name = p.processLabel.trim().toLowerCase();
    const first = seen.get(name);
    if (name && first !== undefined) {
      setPath(errors, `processes.${i}.processLabel`, { type: 'custom', message: `Same name as process settings ${first + 1}; name them apart` });
    } else seen.set(name, i);
  });
  for (const issue of result.success ? [] : result.error.issues) {
    const path = issue.path.length ? issue.path.map(String).join('.') : '_';
    setPath(errors, formFieldOf(path, built.origins), { type: issue.code, message: issue.message });
  }
  return { ok: false as const, errors: errors as FieldErrors<PlanValues>, built };
}

/**
 * A saved trial → the plan form's values (the inverse of buildPlan), in the user's display units.
 * Conditions that share a process label form one row of process settings; a species × resin cell that
 * a process does not have is 0; the most common count becomes the default and cells at it stay blank.
 */
export function planValuesFromTrial(trial: Trial, toDisplay: { temp: (c: number) => number; length: (mm: number) => number }): PlanValues {
  const speciesIds = [...new Set(trial.conditions.map((c) => String(c.speciesId)))];
  const resinIds = [...new Set(trial.conditions.map((c) => String(c.resinId)))];
  const counts = new Map<number, number>();
  for (const c of trial.conditions) counts.set(c.couponsWanted, (counts.get(c.couponsWanted) ?? 0) + 1);
  const usual = [...counts.entries()].sort((a, b) => b[1] - a[1] || b[0] - a[0])[0]?.[0] ?? 5;
  const labels = [...new Set(trial.conditions.map((c) => c.processLabel))];
  const processes: ProcessRow[] = labels.map((label) => {
    const mine = trial.conditions.filter((c) => c.processLabel === label);
    const first = mine[0]!;
    const cells: Record<string, number | null> = {};
    for (const s of speciesIds) {
      for (const r of resinIds) {
        const c = mine.find((x) => String(x.speciesId) === s && String(x.resinId) === r);
        cells[cellKey(s, r)] = c === undefined ? 0 : c.couponsWanted === usual ? null : c.couponsWanted;
      }
    }
    return {
      processLabel: label,
      vacuumMinutes: first.vacuumMinutes,
      soakMinutes: first.soakMinutes,
      cureTemp: first.cureTempC === null ? null : Number(toDisplay.temp(first.cureTempC).toFixed(1)),
      cureMinutes: first.cureMinutes,
      thickness: first.thicknessMm === null ? null : Number(toDisplay.length(first.thicknessMm).toFixed(3)),
      cells,
    };
  });
  return {
    title: trial.title,
    question: trial.question,
    controlsPerSpecies: trial.controlsPerSpecies,
    notes: trial.notes,
    speciesIds,
    resinIds,
    couponsPerCondition: usual,
    processes,
  };
}
