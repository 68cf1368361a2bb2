import type { ReactNode } from 'react';

/** A safety reminder, bordered and headed with the word "Caution" so it never reads as decoration. */
export function CautionNote({ children }: { children: ReactNode }) {
  return (
    <aside aria-label="Caution" className="mb-4 rounded border-2 border-amber-ink bg-paper px-3 py-2 text-sm">
      <strong className="text-amber-ink">Caution:</strong> {children}
    </aside>
  );
}
