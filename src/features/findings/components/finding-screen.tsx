import { useQuery } from '@tanstack/react-query';
import { useId, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { SIGNATURE_MEANINGS, SIGNATURE_MEANING_LABELS, type SignatureMeaning } from '../../../../shared/constants/findings';
import type { Finding } from '../../../../shared/schemas/findings';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { FrozenEvidence, RenderedMarkdown, SignatureFooter } from '../../../components/ui/signed-record';
import { paths } from '../../../config/paths';
import { ApiError } from '../../../lib/api-client';
import { idParam } from '../../../lib/routing';
import { attachableViewsQuery, findingQuery, revisionQuery, revisionsQuery } from '../api/findings-queries';
import { useApproveFinding, useAttachEvidence, useComment, useDetachEvidence, useFindingStep, useReturnFinding } from '../api/use-finding-mutations';
import { DraftEditor } from './draft-editor';
import { StateBadge } from './state-badge';

export function FindingScreen() {
  const id = idParam(useParams());
  const finding = useQuery({ ...findingQuery(id ?? 0), enabled: id !== null });
  if (id === null) {
    return (
      <Page title="Finding">
        <p>There is no finding at this address.</p>
      </Page>
    );
  }
  if (finding.isPending)
    return (
      <Page title="Finding">
        <Loading />
      </Page>
    );
  if (finding.isError)
    return (
      <Page title="Finding">
        <ErrorNote error={finding.error} />
      </Page>
    );
  return <FindingView finding={finding.data} />;
}

function FindingView({ finding: f }: { finding: Finding }) {
  const can = (a: Finding['actions'][number]) => f.actions.includes(a);
  return (
    <Page title={f.title || 'Untitled finding'} actions={<StepButtons finding={f} />}>
      <p className="mb-4 flex flex-wrap items-center gap-2 text-sm text-ink-soft">
        <StateBadge state={f.state} />
        <span>Version {f.version}</span>
        <span>· by {f.author.name}</span>
        {f.editors.some((e) => e.id !== f.author.id) && (
          <span>
            · edited by{' '}
            {f.editors
              .filter((e) => e.id !== f.author.id)
              .map((e) => e.name)
              .join(', ')}
          </span>
        )}
        <span>
          · last saved <time dateTime={f.savedAt}>{new Date(f.savedAt).toLocaleString()}</time>
        </span>
      </p>
      <VersionLinks finding={f} />
      {f.state === 'approved' && f.wikiSlug && (
        <p className="mb-4 rounded border border-moss/40 bg-moss/10 px-3 py-2 text-sm">
          Approved and published: <Link to={paths.wikiPage.href({ slug: f.wikiSlug })}>read the wiki page</Link>. Approved content cannot change; a change is a
          new version, reviewed again.
        </p>
      )}
      {can('edit') ? <DraftEditor key={f.id} finding={f} /> : null}
      <section aria-label={can('edit') ? 'Preview' : 'Finding'} className="mt-6">
        {can('edit') && <h2 className="mb-2">Preview</h2>}
        <RenderedMarkdown html={f.bodyHtml} />
        {(f.species.length > 0 || f.resins.length > 0 || f.trials.length > 0) && (
          <p className="mt-3 text-sm text-ink-soft">
            {f.species.length > 0 && <>Species: {f.species.map((s) => s.name).join(', ')}. </>}
            {f.resins.length > 0 && <>Resins: {f.resins.map((r) => r.name).join(', ')}. </>}
            {f.trials.length > 0 && (
              <>
                Trials:{' '}
                {f.trials.map((t, i) => (
                  <span key={t.id}>
                    {i > 0 && ', '}
                    <Link to={paths.trial.href({ id: t.id })}>{t.code}</Link>
                  </span>
                ))}
                .
              </>
            )}
          </p>
        )}
      </section>
      <EvidencePanel finding={f} />
      {f.signature && <SignatureFooter signature={f.signature} findingId={f.id} />}
      {can('approve') && <ApprovePanel finding={f} />}
      {can('return') && <ReturnPanel finding={f} />}
      <Thread finding={f} />
      <History finding={f} />
    </Page>
  );
}

function VersionLinks({ finding: f }: { finding: Finding }) {
  if (!f.previousVersion && !f.nextVersion) return null;
  return (
    <p className="mb-4 text-sm">
      {f.previousVersion && (
        <>
          Replaces <Link to={paths.finding.href({ id: f.previousVersion.id })}>version {f.previousVersion.version}</Link>.{' '}
        </>
      )}
      {f.nextVersion && (
        <>
          A newer version exists: <Link to={paths.finding.href({ id: f.nextVersion.id })}>version {f.nextVersion.version}</Link>.
        </>
      )}
    </p>
  );
}

function StepButtons({ finding: f }: { finding: Finding }) {
  const step = useFindingStep(f.id);
  const navigate = useNavigate();
  const [error, setError] = useState<string | null>(null);
  const run = (s: 'submit' | 'reopen' | 'withdraw' | 'revise') => {
    setError(null);
    step.mutate(s, {
      onSuccess: (next) => {
        if (s === 'revise') void navigate(paths.finding.href({ id: next.id }));
      },
      onError: (err) => setError(err.message),
    });
  };
  return (
    <>
      {f.actions.includes('submit') && (
        <button type="button" className="btn-primary" disabled={step.isPending} onClick={() => run('submit')}>
          Submit for review
        </button>
      )}
      {f.actions.includes('reopen') && (
        <button type="button" className="btn-primary" disabled={step.isPending} onClick={() => run('reopen')}>
          Reopen to revise
        </button>
      )}
      {f.actions.includes('revise') && (
        <button type="button" className="btn-quiet" disabled={step.isPending} onClick={() => run('revise')}>
          Start a new version
        </button>
      )}
      {f.actions.includes('withdraw') && (
        <button type="button" className="btn-quiet" disabled={step.isPending} onClick={() => run('withdraw')}>
          Withdraw
        </button>
      )}
      {error && (
        <span role="alert" className="self-center text-sm text-margin">
          {error}
        </span>
      )}
    </>
  );
}

function EvidencePanel({ finding: f }: { finding: Finding }) {
  const mayAttach = f.actions.includes('attach');
  const views = useQuery({ ...attachableViewsQuery(), enabled: mayAttach });
  const attach = useAttachEvidence(f.id);
  const detach = useDetachEvidence(f.id);
  const [pick, setPick] = useState('');
  const id = useId();
  return (
    <section aria-labelledby={`${id}-h`} className="mt-6">
      <h2 id={`${id}-h`} className="mb-2">
        Evidence
      </h2>
      {f.evidence.length === 0 && <p className="text-sm text-ink-soft">No evidence attached yet.</p>}
      <div className="space-y-4">
        {f.evidence.map((e) => (
          <FrozenEvidence
            key={e.id}
            evidence={e}
            actions={
              mayAttach ? (
                <button type="button" className="btn-quiet" disabled={detach.isPending} onClick={() => detach.mutate(e.id)}>
                  Remove {e.title}
                </button>
              ) : undefined
            }
          />
        ))}
      </div>
      {mayAttach && (
        <form
          className="mt-4 flex flex-wrap items-end gap-3"
          onSubmit={(ev) => {
            ev.preventDefault();
            if (pick) attach.mutate(Number(pick), { onSuccess: () => setPick('') });
          }}
        >
          <div>
            <label htmlFor={`${id}-view`} className="field-label">
              Saved view to attach
            </label>
            <select id={`${id}-view`} className="field-input" value={pick} onChange={(e) => setPick(e.target.value)}>
              <option value="">{views.data?.items.length === 0 ? 'No saved views yet (save one on Compare)' : 'Pick a saved view'}</option>
              {views.data?.items.map((v) => (
                <option key={v.id} value={v.id}>
                  {v.title} — {v.createdBy.name}, {new Date(v.createdAt).toLocaleDateString()}
                </option>
              ))}
            </select>
          </div>
          <button type="submit" className="btn-quiet" disabled={!pick || attach.isPending}>
            Attach (frozen copy)
          </button>
          {attach.isError && (
            <span role="alert" className="text-sm text-margin">
              {attach.error.message}
            </span>
          )}
        </form>
      )}
    </section>
  );
}

function ApprovePanel({ finding: f }: { finding: Finding }) {
  const approve = useApproveFinding(f.id);
  const [password, setPassword] = useState('');
  const [meaning, setMeaning] = useState<SignatureMeaning>('approved-for-wiki');
  const id = useId();
  const passwordError = approve.error instanceof ApiError ? approve.error.fieldErrors.password?.[0] : undefined;
  return (
    <section aria-labelledby={`${id}-h`} className="sheet mt-6 p-4">
      <h2 id={`${id}-h`}>Approve with your signature</h2>
      <p className="mt-1 max-w-3xl text-sm text-ink-soft">
        Your signature covers this version's text, tags and every piece of evidence as frozen above. It records your name, the time and what it means, and
        cannot be changed afterwards.
      </p>
      <form
        className="mt-3 max-w-md"
        onSubmit={(e) => {
          e.preventDefault();
          approve.mutate({ password, meaning }, { onSettled: () => setPassword('') });
        }}
      >
        <fieldset className="mb-4">
          <legend className="field-label">What your signature means</legend>
          {SIGNATURE_MEANINGS.map((m) => (
            <label key={m} className="mt-1 flex items-center gap-2">
              <input type="radio" name={`${id}-meaning`} value={m} checked={meaning === m} onChange={() => setMeaning(m)} /> {SIGNATURE_MEANING_LABELS[m]}
            </label>
          ))}
        </fieldset>
        <div className="mb-4">
          <label htmlFor={`${id}-pw`} className="field-label">
            Your password (to sign)
          </label>
          <input
            id={`${id}-pw`}
            type="password"
            autoComplete="current-password"
            className="field-input"
            value={password}
            aria-invalid={passwordError ? true : undefined}
            aria-describedby={passwordError ? `${id}-pw-error` : undefined}
            onChange={(e) => setPassword(e.target.value)}
          />
          {passwordError && (
            <p id={`${id}-pw-error`} role="alert" className="mt-1 text-sm text-margin">
              {passwordError}
            </p>
          )}
        </div>
        {approve.isError && !passwordError && (
          <p role="alert" className="mb-3 text-sm text-margin">
            {approve.error.message}
          </p>
        )}
        <button type="submit" className="btn-primary" disabled={!password || approve.isPending}>
          Sign and approve
        </button>
      </form>
    </section>
  );
}

function ReturnPanel({ finding: f }: { finding: Finding }) {
  const ret = useReturnFinding(f.id);
  const [reason, setReason] = useState('');
  const id = useId();
  return (
    <section aria-labelledby={`${id}-h`} className="sheet mt-6 p-4">
      <h2 id={`${id}-h`}>Return to the author</h2>
      <form
        className="mt-2 max-w-2xl"
        onSubmit={(e) => {
          e.preventDefault();
          ret.mutate(reason, { onSuccess: () => setReason('') });
        }}
      >
        <label htmlFor={`${id}-reason`} className="field-label">
          Why it goes back (Markdown)
        </label>
        <textarea id={`${id}-reason`} className="field-input" rows={3} value={reason} onChange={(e) => setReason(e.target.value)} />
        {ret.isError && (
          <p role="alert" className="mt-1 text-sm text-margin">
            {ret.error.message}
          </p>
        )}
        <button type="submit" className="btn-quiet mt-2" disabled={!reason.trim() || ret.isPending}>
          Return with this reason
        </button>
      </form>
    </section>
  );
}

const KIND_WORDS: Record<Finding['thread'][number]['kind'], string> = {
  comment: 'commented',
  submitted: 'submitted it for review',
  returned: 'returned it',
  approved: 'approved it',
  reopened: 'reopened it',
  withdrawn: 'withdrew it',
};

function Thread({ finding: f }: { finding: Finding }) {
  const comment = useComment(f.id);
  const [text, setText] = useState('');
  const id = useId();
  return (
    <section aria-labelledby={`${id}-h`} className="mt-6">
      <h2 id={`${id}-h`} className="mb-2">
        Review thread
      </h2>
      {f.thread.length === 0 && <p className="text-sm text-ink-soft">Nothing said yet.</p>}
      <ol className="space-y-3">
        {f.thread.map((c) => (
          <li key={c.id} className="sheet p-3">
            <p className="text-xs text-ink-faint">
              <strong className="text-ink-soft">{c.author.name}</strong> {KIND_WORDS[c.kind]} ·{' '}
              <time dateTime={c.createdAt}>{new Date(c.createdAt).toLocaleString()}</time>
            </p>
            <RenderedMarkdown html={c.bodyHtml} />
          </li>
        ))}
      </ol>
      {f.actions.includes('comment') && (
        <form
          className="mt-3 max-w-2xl"
          onSubmit={(e) => {
            e.preventDefault();
            comment.mutate(text, { onSuccess: () => setText('') });
          }}
        >
          <label htmlFor={`${id}-c`} className="field-label">
            Comment (Markdown)
          </label>
          <textarea id={`${id}-c`} className="field-input" rows={3} value={text} onChange={(e) => setText(e.target.value)} />
          {comment.isError && (
            <p role="alert" className="mt-1 text-sm text-margin">
              {comment.error.message}
            </p>
          )}
          <button type="submit" className="btn-quiet mt-2" disabled={!text.trim() || comment.isPending}>
            Add comment
          </button>
        </form>
      )}
    </section>
  );
}

function History({ finding: f }: { finding: Finding }) {
  const [open, setOpen] = useState(false);
  const list = useQuery({ ...revisionsQuery(f.id), enabled: open });
  const [shown, setShown] = useState<number | null>(null);
  const rev = useQuery({ ...revisionQuery(f.id, shown ?? 0), enabled: shown !== null });
  return (
    <details className="mt-6" onToggle={(e) => setOpen((e.target as HTMLDetailsElement).open)}>
      <summary className="cursor-pointer font-semibold">Version history of this draft</summary>
      {list.isPending && open ? (
        <Loading />
      ) : list.data ? (
        <ol className="mt-2 space-y-1 text-sm">
          {list.data.items.map((r) => (
            <li key={r.revision}>
              <button type="button" className="underline" onClick={() => setShown(r.revision)}>
                Revision {r.revision}
              </button>{' '}
              by {r.editor.name}, <time dateTime={r.savedAt}>{new Date(r.savedAt).toLocaleString()}</time> — {r.title}
            </li>
          ))}
        </ol>
      ) : null}
      {rev.data && (
        <div className="sheet mt-3 p-3" aria-label={`Revision ${rev.data.revision}`}>
          <p className="text-xs text-ink-faint">
            Revision {rev.data.revision} as saved by {rev.data.editor.name}
          </p>
          <h3 className="font-semibold">{rev.data.title}</h3>
          <RenderedMarkdown html={rev.data.bodyHtml} />
        </div>
      )}
    </details>
  );
}
