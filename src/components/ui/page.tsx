import { useEffect, type ReactNode } from 'react';

/** A screen: one h1, and the document title follows it so screen-reader users hear where they are. */
export function Page({ title, actions, children }: { title: string; actions?: ReactNode; children: ReactNode }) {
  useEffect(() => {
    document.title = `${title} · Lumenbook`;
  }, [title]);
  return (
    <div className="mx-auto max-w-6xl px-4 py-6">
      <div className="mb-6 flex flex-wrap items-end justify-between gap-3 border-b border-rule pb-3">
        <h1>{title}</h1>
        {actions && <div className="no-print flex flex-wrap gap-2">{actions}</div>}
      </div>
      {children}
    </div>
  );
}

/** Honest placeholder for a screen that a later release delivers. */
export function LaterRelease({ what }: { what: string }) {
  return (
    <section className="sheet max-w-2xl p-6" aria-label="Not yet available">
      <p className="text-ink-soft">
        <strong className="text-ink">Coming in a later release.</strong> {what}
      </p>
    </section>
  );
}

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <p role="status" className="text-ink-faint">
      {label}
    </p>
  );
}

export function ErrorNote({ error }: { error: unknown }) {
  const message = error instanceof Error ? error.message : 'Something went wrong';
  return (
    <p role="alert" className="rounded border border-margin/40 bg-margin/10 px-3 py-2 text-sm text-margin">
      {message}
    </p>
  );
}
