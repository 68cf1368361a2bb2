import type Database from 'better-sqlite3';

/**
 * The tables an analysis answer is read from. A write to any of them (through any feature, a test, the
 * rebuild) may change an answer, so each bumps the generation below.
 */
export const ANALYSIS_SOURCE_TABLES = ['coupon_results', 'species', 'resins', 'runs', 'run_stages'] as const;

/**
 * A version of the data the analysis reads, cheap enough to check on every request (three one-row reads),
 * and the coupons written since an earlier version:
 *
 * - writes through this connection are logged by TEMP triggers on the source tables: one row per row
 *   written in a TEMP log (`analysis_changes`), the coupon's id for a results row, the run's id negated
 *   for a run or its stages, NULL for species and resins. The log's last rowid is the generation. The triggers live with the connection, so no
 *   migration and nothing stored in the file. The log row is part of the writer's transaction, so a
 *   rollback takes it back together with the write it counted. Appending one row costs a bulk write what
 *   the counter it replaced did (one temp-table write per row);
 * - writes by another connection (another process on a copy, the rebuild command) change SQLite's
 *   `data_version`;
 * - a schema change (a table rebuilt by a migration would drop its triggers) changes `schema_version`,
 *   and the triggers are put back.
 *
 * Any change gives a new version string, so an answer cached under an old one is never served again.
 * Counting every row written is conservative (a write that leaves the answer equal still refreshes it).
 */
export interface DataVersion {
  (): string;
  /**
   * What was written through this connection since `since` (a string this function returned): the ids of
   * the results rows and of the runs (a run or its stages), in no order, possibly repeated, and the trial ×
   * species of every control among the results rows (before and after the write, whatever the reader's
   * filters: the treated coupons there have their ASE and WRE against it), and whether species or resins
   * were written (`names`); null when that cannot be told from the log: another connection wrote, the
   * schema changed, or more than `limit` rows were.
   */
  changedSince(
    since: string,
    limit: number,
  ): { couponIds: number[]; runIds: number[]; controlPairs: { trialId: number; speciesId: number }[]; names: boolean } | null;
  /**
   * Keeps the log to its last `keep` rows. The log belongs to the connection, which may serve several
   * readers, so it is cut by length, never by what one reader has seen; a reader whose version is older
   * than the rows kept is told "cannot tell" (null) and reads afresh.
   */
  prune(keep: number): void;
}

export function createDataVersion(sqlite: Database.Database): DataVersion {
  let installedAt = -1;
  const install = () => {
    const sql = ['CREATE TEMP TABLE IF NOT EXISTS analysis_changes (coupon_id INTEGER, control INTEGER, trial_id INTEGER, species_id INTEGER)'];
    // What a row of each table logs: a results row its coupon's id, a run or a run's stage the run's id
    // negated (its coupons' run code and treated date follow it), species and resins NULL with control 2
    // (names and reference values: a held set keeps its rows and takes the new names).
    // A results row also logs whether it is a control, with its trial and species (other coupons' ASE and
    // WRE rest on the controls of their trial and species); a control that stops being one, or moves,
    // logs its former trial and species as well (below).
    const logged: Record<(typeof ANALYSIS_SOURCE_TABLES)[number], (op: 'insert' | 'update' | 'delete') => string> = {
      coupon_results: (op) =>
        op === 'delete'
          ? "OLD.coupon_id, OLD.role = 'control', OLD.trial_id, OLD.species_id"
          : "NEW.coupon_id, NEW.role = 'control', NEW.trial_id, NEW.species_id",
      runs: (op) => `-${op === 'delete' ? 'OLD' : 'NEW'}.id, 0, NULL, NULL`,
      run_stages: (op) => `-${op === 'delete' ? 'OLD' : 'NEW'}.run_id, 0, NULL, NULL`,
      species: () => 'NULL, 2, NULL, NULL',
      resins: () => 'NULL, 2, NULL, NULL',
    };
    for (const table of ANALYSIS_SOURCE_TABLES) {
      for (const op of ['insert', 'update', 'delete'] as const)
        sql.push(
          `CREATE TEMP TRIGGER IF NOT EXISTS analysis_changes_${table}_${op} AFTER ${op.toUpperCase()} ON main.${table} ` +
            `BEGIN INSERT INTO analysis_changes (coupon_id, control, trial_id, species_id) VALUES (${logged[table](op)}); END`,
        );
    }
    // A results row that changes its coupon (never done today) leaves its old id changed too.
    sql.push(
      'CREATE TEMP TRIGGER IF NOT EXISTS analysis_changes_coupon_results_moved AFTER UPDATE OF coupon_id ON main.coupon_results ' +
        'WHEN OLD.coupon_id IS NOT NEW.coupon_id BEGIN INSERT INTO analysis_changes (coupon_id, control, trial_id, species_id) ' +
        "VALUES (OLD.coupon_id, OLD.role = 'control', OLD.trial_id, OLD.species_id); END",
      'CREATE TEMP TRIGGER IF NOT EXISTS analysis_changes_coupon_results_control_was AFTER UPDATE ON main.coupon_results ' +
        "WHEN OLD.role = 'control' AND (NEW.role IS NOT 'control' OR OLD.trial_id IS NOT NEW.trial_id OR OLD.species_id IS NOT NEW.species_id) " +
        'BEGIN INSERT INTO analysis_changes (coupon_id, control, trial_id, species_id) VALUES (OLD.coupon_id, 1, OLD.trial_id, OLD.species_id); END',
    );
    sqlite.exec(sql.join(';\n'));
    // A first row, so the generation is never empty; NULL: "not a coupon row", so nothing before it is patchable.
    sqlite.exec('INSERT INTO analysis_changes (rowid, coupon_id, control) SELECT 1, NULL, 0 WHERE NOT EXISTS (SELECT 1 FROM analysis_changes)');
    installedAt = (sqlite.prepare('SELECT schema_version FROM pragma_schema_version').pluck().get() as number) ?? 0;
  };
  install();
  const read = sqlite
    .prepare(
      'SELECT (SELECT max(rowid) FROM temp.analysis_changes), (SELECT data_version FROM pragma_data_version), (SELECT schema_version FROM pragma_schema_version)',
    )
    .raw(true);
  const since = sqlite.prepare('SELECT coupon_id, control, trial_id, species_id FROM temp.analysis_changes WHERE rowid > ? LIMIT ?').raw(true);
  const first = sqlite.prepare('SELECT min(rowid) FROM temp.analysis_changes').pluck();
  const forget = sqlite.prepare('DELETE FROM temp.analysis_changes WHERE rowid <= (SELECT max(rowid) FROM temp.analysis_changes) - ?');
  const version = (() => {
    let row = read.get() as [number, number, number];
    if (row[2] !== installedAt) {
      install();
      row = read.get() as [number, number, number];
    }
    return row.join(':');
  }) as DataVersion;
  version.changedSince = (before: string, limit: number) => {
    const [gen, data, schema] = before.split(':');
    const [, dataNow, schemaNow] = version().split(':');
    if (data !== dataNow || schema !== schemaNow) return null;
    // Rows after `gen` were cut away by prune: what changed can no longer be told.
    if (Number(gen) < (first.get() as number) - 1) return null;
    const rows = since.all(Number(gen), limit + 1) as [number | null, number | null, number | null, number | null][];
    if (rows.length > limit) return null;
    const couponIds: number[] = [];
    const runIds: number[] = [];
    const pairs = new Map<string, { trialId: number; speciesId: number }>();
    let names = false;
    for (const [id, control, trialId, speciesId] of rows) {
      if (id === null && control === 2) {
        names = true;
        continue;
      }
      if (id === null) return null;
      if (id < 0) runIds.push(-id);
      else couponIds.push(id);
      // A control in no trial is no treated coupon's reference.
      if (control && trialId !== null && speciesId !== null) pairs.set(`${trialId}|${speciesId}`, { trialId, speciesId });
    }
    return { couponIds, runIds, controlPairs: [...pairs.values()], names };
  };
  version.prune = (keep: number) => {
    forget.run(Math.max(1, keep));
  };
  return version;
}

/** A small least-recently-used map: a hit moves the entry to the back, the front is dropped when full. */
export class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly max: number) {}
  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: string, value: V): void {
    this.map.delete(key);
    this.map.set(key, value);
    while (this.map.size > this.max) this.map.delete(this.map.keys().next().value as string);
  }
  clear(): void {
    this.map.clear();
  }
  get size(): number {
    return this.map.size;
  }
}

/** A cache key for a value made of plain data, independent of the order object keys were written in. */
export function keyOf(value: unknown): string {
  return JSON.stringify(value, (_k, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(
          Object.entries(v as Record<string, unknown>)
            .filter(([, x]) => x !== undefined)
            .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)),
        )
      : v,
  );
}
