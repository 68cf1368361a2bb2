import { useQuery } from '@tanstack/react-query';
import { useEffect, useId, useRef, useState } from 'react';
import type { Finding, UpdateFindingInput } from '../../../../shared/schemas/findings';
import { ApiError } from '../../../lib/api-client';
import { resinOptionsQuery, speciesOptionsQuery, trialOptionsQuery } from '../../../lib/queries/options';
import { useSaveFinding } from '../api/use-finding-mutations';

type Content = Required<Omit<UpdateFindingInput, 'baseRevision'>>;
const AUTOSAVE_MS = 800;

const contentOf = (f: Finding): Content => ({
  title: f.title,
  bodyMd: f.bodyMd,
  trialIds: f.trials.map((t) => t.id),
  speciesIds: f.species.map((s) => s.id),
  resinIds: f.resins.map((r) => r.id),
});

type SaveState = { kind: 'saved'; at: string } | { kind: 'dirty' } | { kind: 'saving' } | { kind: 'error'; message: string };

/**
 * The draft as its writer edits it. Every change is saved a moment after typing stops; the state of the
 * save is always visible (and announced politely). A save that lands on a revision someone else has
 * replaced is refused by the server and said so, instead of overwriting their words.
 */
export function DraftEditor({ finding }: { finding: Finding }) {
  const [content, setContent] = useState<Content>(() => contentOf(finding));
  const [status, setStatus] = useState<SaveState>({ kind: 'saved', at: finding.savedAt });
  const revision = useRef(finding.revision);
  const pending = useRef<Content | null>(null);
  const save = useSaveFinding(finding.id);
  const species = useQuery(speciesOptionsQuery());
  const resins = useQuery(resinOptionsQuery());
  const trials = useQuery(trialOptionsQuery());
  const ids = useId();

  useEffect(() => {
    if (pending.current === null) return;
    const timer = setTimeout(() => {
      const next = pending.current;
      if (!next) return;
      pending.current = null;
      setStatus({ kind: 'saving' });
      save.mutate(
        { baseRevision: revision.current, ...next },
        {
          onSuccess: (f) => {
            revision.current = f.revision;
            // Typing may have gone on while the save travelled; only then is it still unsaved.
            setStatus(pending.current ? { kind: 'dirty' } : { kind: 'saved', at: f.savedAt });
          },
          onError: (err) =>
            setStatus({
              kind: 'error',
              message: err instanceof ApiError && err.status === 409 ? `${err.message}.` : `Not saved: ${err instanceof Error ? err.message : 'try again'}`,
            }),
        },
      );
    }, AUTOSAVE_MS);
    return () => clearTimeout(timer);
    // `save` is stable enough for this purpose; the effect runs again on every edit.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [content]);

  function change(patch: Partial<Content>) {
    const next = { ...content, ...patch };
    pending.current = next;
    setContent(next);
    setStatus({ kind: 'dirty' });
  }

  const picked = (e: React.ChangeEvent<HTMLSelectElement>) => [...e.target.selectedOptions].map((o) => Number(o.value));

  return (
    <section aria-label="Draft" className="sheet p-4">
      <div className="mb-3 flex items-center justify-between gap-2">
        <h2>Draft</h2>
        <p role="status" aria-live="polite" className="text-sm" data-save-state={status.kind}>
          {status.kind === 'saved' && <span className="text-moss">All changes saved · {new Date(status.at).toLocaleTimeString()}</span>}
          {status.kind === 'dirty' && <span className="text-ink-soft">Unsaved changes…</span>}
          {status.kind === 'saving' && <span className="text-ink-soft">Saving…</span>}
          {status.kind === 'error' && <span className="text-margin">{status.message}</span>}
        </p>
      </div>
      <div className="mb-4">
        <label htmlFor={`${ids}-title`} className="field-label">
          Title
        </label>
        <input id={`${ids}-title`} className="field-input" value={content.title} maxLength={200} onChange={(e) => change({ title: e.target.value })} />
      </div>
      <div className="mb-4">
        <label htmlFor={`${ids}-body`} className="field-label">
          Body (Markdown)
        </label>
        <textarea
          id={`${ids}-body`}
          className="field-input font-mono text-sm"
          rows={12}
          value={content.bodyMd}
          aria-describedby={`${ids}-body-hint`}
          onChange={(e) => change({ bodyMd: e.target.value })}
        />
        <p id={`${ids}-body-hint`} className="mt-1 text-xs text-ink-faint">
          Markdown: **bold**, *italic*, lists, tables, links. Raw HTML is shown as text. The preview below follows each save.
        </p>
      </div>
      <div className="grid gap-4 md:grid-cols-3">
        <div>
          <label htmlFor={`${ids}-species`} className="field-label">
            Species
          </label>
          <select
            id={`${ids}-species`}
            multiple
            size={6}
            className="field-input"
            value={content.speciesIds.map(String)}
            onChange={(e) => change({ speciesIds: picked(e) })}
          >
            {species.data?.map((s) => (
              <option key={s.id} value={s.id}>
                {s.label}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${ids}-resins`} className="field-label">
            Resins
          </label>
          <select
            id={`${ids}-resins`}
            multiple
            size={6}
            className="field-input"
            value={content.resinIds.map(String)}
            onChange={(e) => change({ resinIds: picked(e) })}
          >
            {resins.data?.map((r) => (
              <option key={r.id} value={r.id}>
                {r.label}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${ids}-trials`} className="field-label">
            Linked trials
          </label>
          <select
            id={`${ids}-trials`}
            multiple
            size={6}
            className="field-input"
            value={content.trialIds.map(String)}
            onChange={(e) => change({ trialIds: picked(e) })}
          >
            {trials.data?.map((t) => (
              <option key={t.id} value={t.id}>
                {t.label}
              </option>
            ))}
          </select>
        </div>
      </div>
      <p className="text-xs text-ink-faint">Hold Ctrl (⌘ on a Mac) to pick more than one. Tags put the approved page in the wiki index.</p>
    </section>
  );
}
