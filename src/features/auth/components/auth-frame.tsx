import { useEffect, type ReactNode } from 'react';

/** The sheet that sign-in, reset and invitation pages sit on. */
export function AuthFrame({ title, children }: { title: string; children: ReactNode }) {
  useEffect(() => {
    document.title = `${title} · Lumenbook`;
  }, [title]);
  return (
    <main id="main" className="flex min-h-screen items-start justify-center px-4 pt-16">
      <div className="w-full max-w-md">
        <p className="mb-2 text-sm tracking-widest text-amber-ink uppercase">Lumenbook</p>
        <div className="sheet p-6">
          <h1 className="mb-4">{title}</h1>
          {children}
        </div>
        <p className="mt-4 text-xs text-ink-faint">A research notebook for wood-stabilizing trials.</p>
      </div>
    </main>
  );
}
