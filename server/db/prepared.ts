import type Database from 'better-sqlite3';
import type { Db } from './client';

/** better-sqlite3 underneath drizzle: the same connection, so these statements run inside the caller's transaction. */
export function client(tx: Db): Database.Database {
  return (tx as unknown as { $client?: Database.Database }).$client ?? (tx as unknown as { session: { client: Database.Database } }).session.client;
}

const statements = new WeakMap<Database.Database, Map<string, Database.Statement>>();

/**
 * A prepared statement, prepared once per connection. Preparing the results upsert (51 columns) cost more
 * than running it, and building a list query with drizzle on every request cost several times running it;
 * the hot reads and writes keep their SQL text constant (ids bound as one JSON array) and come through here.
 */
export function prepared(tx: Db, text: string): Database.Statement {
  const c = client(tx);
  let map = statements.get(c);
  if (!map) {
    map = new Map();
    statements.set(c, map);
  }
  let st = map.get(text);
  if (!st) {
    st = c.prepare(text);
    map.set(text, st);
  }
  return st;
}

/**
 * The same, answering rows as arrays (better-sqlite3's raw mode): building a JS object per row with named
 * properties cost 2–3× the query on 100,000-row reads (a results refresh, an import's tag lookup). Kept
 * apart from `prepared`, because raw mode is a setting of the statement and the plain one is shared.
 */
export function preparedRaw(tx: Db, text: string): Database.Statement {
  return prepared(tx, `${text} /* raw */`).raw(true);
}

/** Something built once per database handle (a drizzle prepared query), remembered by a key naming its shape. */
const built = new WeakMap<Db, Map<string, unknown>>();
export function once<T>(db: Db, key: string, build: () => T): T {
  let map = built.get(db);
  if (!map) {
    map = new Map();
    built.set(db, map);
  }
  let v = map.get(key) as T | undefined;
  if (v === undefined) {
    v = build();
    map.set(key, v);
  }
  return v;
}
