import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { FINDING_STATES, FINDING_STATE_LABELS, type FindingState } from '../../../../shared/constants/findings';
import { ErrorNote, Loading, Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { useRole } from '../../../lib/session';
import { findingListQuery } from '../api/findings-queries';
import { StateBadge } from './state-badge';

/** Every finding with its review state; technicians start new ones here. */
export function FindingsScreen() {
  const { can } = useRole();
  const [state, setState] = useState<FindingState | ''>('');
  const [mine, setMine] = useState(false);
  const list = useQuery(findingListQuery({ state: state || undefined, mine: mine ? 'true' : undefined }));
  return (
    <Page
      title="Findings"
      actions={
        can('technician') ? (
          <Link to={paths.findingNew.href()} className="btn-primary no-underline">
            Write a finding
          </Link>
        ) : undefined
      }
    >
      <p className="mb-4 max-w-3xl text-sm text-ink-soft">
        A finding is a written conclusion with the evidence it stands on. A reviewer who did not write or edit it approves it with a signature, and it becomes a
        page of the shop wiki.
      </p>
      <div className="mb-4 flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="finding-state" className="field-label">
            Review state
          </label>
          <select id="finding-state" className="field-input" value={state} onChange={(e) => setState(e.target.value as FindingState | '')}>
            <option value="">Any state</option>
            {FINDING_STATES.map((s) => (
              <option key={s} value={s}>
                {FINDING_STATE_LABELS[s]}
              </option>
            ))}
          </select>
        </div>
        <label className="flex items-center gap-2 pb-2 text-sm">
          <input type="checkbox" checked={mine} onChange={(e) => setMine(e.target.checked)} /> Only mine
        </label>
      </div>
      {list.isPending ? (
        <Loading />
      ) : list.isError ? (
        <ErrorNote error={list.error} />
      ) : list.data.items.length === 0 ? (
        <p>No findings yet.</p>
      ) : (
        <table className="data-table">
          <thead>
            <tr>
              <th scope="col">Title</th>
              <th scope="col">State</th>
              <th scope="col">Author</th>
              <th scope="col">Species and resins</th>
              <th scope="col">Last saved</th>
            </tr>
          </thead>
          <tbody>
            {list.data.items.map((f) => (
              <tr key={f.id}>
                <td>
                  <Link to={paths.finding.href({ id: f.id })}>{f.title}</Link>
                  {f.version > 1 && <span className="ml-1 text-xs text-ink-faint">version {f.version}</span>}
                </td>
                <td>
                  <StateBadge state={f.state} />
                  {f.wikiSlug && (
                    <Link className="ml-2 text-xs" to={paths.wikiPage.href({ slug: f.wikiSlug })}>
                      wiki page
                    </Link>
                  )}
                </td>
                <td>{f.author.name}</td>
                <td className="text-ink-soft">{[...f.species, ...f.resins].map((t) => t.name).join(', ') || '—'}</td>
                <td>
                  <time dateTime={f.savedAt}>{new Date(f.savedAt).toLocaleString()}</time>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </Page>
  );
}
