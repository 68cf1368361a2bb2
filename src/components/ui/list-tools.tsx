import { useEffect, useId, useRef, useState, type ReactNode } from 'react';

/**
 * A column header that sorts the list: a button inside the `th`, and `aria-sort` on the header that is
 * sorted, so a screen reader says which column orders the rows and which way. The first click sorts
 * ascending, the next descending.
 */
export function SortHeader({
  label,
  field,
  sort,
  onSort,
  className = '',
  children,
}: {
  label: string;
  field: string;
  /** The list's current sort: `field` or `-field`. */
  sort: string;
  onSort: (sort: string) => void;
  className?: string;
  children?: ReactNode;
}) {
  const direction = sort === field ? 'ascending' : sort === `-${field}` ? 'descending' : null;
  return (
    <th scope="col" aria-sort={direction ?? undefined} className={className}>
      <button
        type="button"
        className="inline-flex min-h-6 items-center gap-1 font-semibold text-ink-soft hover:text-ink"
        onClick={() => onSort(direction === 'ascending' ? `-${field}` : field)}
      >
        {label}
        {children}
        <span aria-hidden="true" className="text-xs">
          {direction === 'ascending' ? '▲' : direction === 'descending' ? '▼' : '↕'}
        </span>
        <span className="sr-only">{direction === 'ascending' ? ', sorted ascending; sort descending' : ', sort ascending'}</span>
      </button>
    </th>
  );
}

/**
 * A search box that applies what is typed after a short pause (not on every key: each change refetches
 * the list), and at once on Enter. Shows the address's value when it changes from outside.
 */
export function SearchBox({
  label,
  value,
  onSearch,
  hint,
  className = '',
}: {
  label: string;
  value: string;
  onSearch: (q: string) => void;
  hint?: string;
  className?: string;
}) {
  const id = useId();
  const [text, setText] = useState(value);
  // The value this box sent last: an address that changes to it is our own echo, not a change from
  // outside, and must not overwrite what was typed since.
  const sent = useRef(value);
  useEffect(() => {
    if (value !== sent.current) {
      sent.current = value;
      setText(value);
    }
  }, [value]);
  const apply = (q: string) => {
    sent.current = q;
    onSearch(q);
  };
  useEffect(() => {
    if (text.trim() === sent.current) return;
    const t = setTimeout(() => {
      sent.current = text.trim();
      onSearch(text.trim());
    }, 300);
    return () => clearTimeout(t);
  }, [text, onSearch]);
  return (
    <div className={className}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <input
        id={id}
        type="search"
        className="field-input"
        value={text}
        aria-describedby={hint ? `${id}-hint` : undefined}
        onChange={(e) => setText(e.target.value)}
        onKeyDown={(e) => {
          if (e.key === 'Enter') apply(text.trim());
        }}
      />
      {hint && (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-faint">
          {hint}
        </p>
      )}
    </div>
  );
}

/** A labelled select for a list filter; the empty value means "any". */
export function FilterSelect({
  label,
  value,
  onChange,
  options,
  any,
  className = '',
}: {
  label: string;
  value: string | number | undefined;
  onChange: (value: string) => void;
  options: readonly { value: string | number; label: string }[];
  any: string;
  className?: string;
}) {
  const id = useId();
  return (
    <div className={className}>
      <label htmlFor={id} className="field-label">
        {label}
      </label>
      <select id={id} className="field-input" value={value ?? ''} onChange={(e) => onChange(e.target.value)}>
        <option value="">{any}</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </div>
  );
}

/** The list as a CSV file: every row that matches the filters, not only the page shown. */
export function ExportLink({ href, what }: { href: string; what: string }) {
  return (
    <a href={href} download className="btn-quiet no-underline">
      Export CSV<span className="sr-only"> of the {what} shown by these filters</span>
    </a>
  );
}

/** Previous and next page, with where the list is. */
export function Pager({ page, pageSize, total, onPage, what }: { page: number; pageSize: number; total: number; onPage: (p: number) => void; what: string }) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (pages === 1)
    return (
      <p className="mt-2 text-sm text-ink-faint" role="status">
        {total} {what} in all.
      </p>
    );
  return (
    <nav aria-label={`Pages of ${what}`} className="mt-3 flex flex-wrap items-center gap-3 text-sm">
      <button type="button" className="btn-quiet" disabled={page <= 1} onClick={() => onPage(page - 1)}>
        Previous page
      </button>
      <span role="status">
        Page {page} of {pages} ({total} {what})
      </span>
      <button type="button" className="btn-quiet" disabled={page >= pages} onClick={() => onPage(page + 1)}>
        Next page
      </button>
    </nav>
  );
}
