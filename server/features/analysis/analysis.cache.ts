import type Database from 'better-sqlite3';

/**
 * The tables an analysis answer is read from. A write to any of them (through any feature, a test, the
 * rebuild) may change an answer, so each bumps the generation below.
 */
export const ANALYSIS_SOURCE_TABLES = ['coupon_results', 'species', 'resins', 'runs', 'run_stages'] as const;

const OPS = ['insert', 'update', 'delete'] as const;

/**
 * A version of the data the analysis reads, cheap enough to check on every request (three one-row reads):
 *
 * - writes through this connection are counted by TEMP triggers on the source tables (one counter row in
 *   the connection's temp database; the triggers live with the connection, so no migration and nothing
 *   stored in the file). The counter update is part of the writer's transaction, so a rollback takes it
 *   back together with the write it counted;
 * - writes by another connection (another process on a copy, the rebuild command) change SQLite's
 *   `data_version`;
 * - a schema change (a table rebuilt by a migration would drop its triggers) changes `schema_version`,
 *   and the triggers are put back.
 *
 * Any change gives a new version string, so an answer cached under an old one is never served again.
 * Counting every row written is conservative (a write that leaves the answer equal still refreshes it).
 */
export function createDataVersion(sqlite: Database.Database): () => string {
  let installedAt = -1;
  const install = () => {
    const sql = ['CREATE TEMP TABLE IF NOT EXISTS analysis_generation (n INTEGER NOT NULL)'];
    for (const table of ANALYSIS_SOURCE_TABLES)
      for (const op of OPS)
        sql.push(
          `CREATE TEMP TRIGGER IF NOT EXISTS analysis_generation_${table}_${op} AFTER ${op.toUpperCase()} ON main.${table} ` +
            'BEGIN UPDATE analysis_generation SET n = n + 1; END',
        );
    sqlite.exec(sql.join(';\n'));
    sqlite.exec('INSERT INTO analysis_generation (n) SELECT 0 WHERE NOT EXISTS (SELECT 1 FROM analysis_generation)');
    installedAt = (sqlite.prepare('SELECT schema_version FROM pragma_schema_version').pluck().get() as number) ?? 0;
  };
  install();
  const read = sqlite
    .prepare(
      'SELECT (SELECT n FROM temp.analysis_generation), (SELECT data_version FROM pragma_data_version), (SELECT schema_version FROM pragma_schema_version)',
    )
    .raw(true);
  return () => {
    let row = read.get() as [number, number, number];
    if (row[2] !== installedAt) {
      install();
      row = read.get() as [number, number, number];
    }
    return row.join(':');
  };
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
