import { useSearchParams } from 'react-router-dom';

/** Values of a list's address: empty, null and undefined are left out of it. */
export type ListParamValues = Record<string, string | number | null | undefined>;

/**
 * A list's sort, search, filters and page kept in the address (`?sort=-wpgPct&speciesId=3&page=2`), so a
 * link or a reload shows the same view. Changing a filter goes back to page 1; the history is replaced
 * rather than pushed, so Back leaves the list instead of undoing each keystroke of a search.
 */
export function useListParams() {
  const [search, setSearch] = useSearchParams();
  const get = (key: string): string => search.get(key) ?? '';
  const getId = (key: string): number | undefined => {
    const n = Number(search.get(key));
    return Number.isInteger(n) && n > 0 ? n : undefined;
  };
  const set = (changes: ListParamValues, keepPage = false) => {
    const next = new URLSearchParams(search);
    for (const [k, v] of Object.entries(changes)) {
      if (v === undefined || v === null || v === '') next.delete(k);
      else next.set(k, String(v));
    }
    if (!keepPage) next.delete('page');
    setSearch(next, { replace: true });
  };
  const page = Math.max(1, Math.floor(Number(search.get('page'))) || 1);
  return { search, get, getId, set, page, setPage: (p: number) => set({ page: p > 1 ? p : null }, true) };
}

/** A query string of the values given (`?a=1&b=x`, or '' when none), for an export link beside the list. */
export function queryOf(values: ListParamValues): string {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(values)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v));
  const s = q.toString();
  return s ? `?${s}` : '';
}
