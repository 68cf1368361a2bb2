import type { Caution } from '../../../../shared/runs/cautions';

/** Safety reminders in a bordered note that starts with the word, so the meaning never rests on colour. */
export function CautionNote({ cautions }: { cautions: readonly Caution[] }) {
  if (cautions.length === 0) return null;
  return (
    <aside className="my-3 rounded border-2 border-amber-ink bg-amber-light/40 px-4 py-3 text-sm" aria-label="Caution">
      <p className="font-semibold text-ink">Caution</p>
      <ul className="mt-1 space-y-1">
        {cautions.map((c) => (
          <li key={c.id}>
            <strong>{c.title}:</strong> {c.text}
          </li>
        ))}
      </ul>
    </aside>
  );
}
