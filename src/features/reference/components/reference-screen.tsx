import { useRef, type KeyboardEvent } from 'react';
import { useSearchParams } from 'react-router-dom';
import { Page } from '../../../components/ui/page';
import { LotsPanel } from './lots-panel';
import { ResinsPanel } from './resins-panel';
import { SpeciesPanel } from './species-panel';

const TABS = [
  { id: 'species', label: 'Species' },
  { id: 'resins', label: 'Resins' },
  { id: 'lots', label: 'Resin lots' },
] as const;
type TabId = (typeof TABS)[number]['id'];

/** Species, resins and resin lots. The open tab is in the address (?tab=) so it can be linked to. */
export function ReferenceScreen() {
  const [params, setParams] = useSearchParams();
  const current: TabId = TABS.find((t) => t.id === params.get('tab'))?.id ?? 'species';
  const tabRefs = useRef<Record<string, HTMLButtonElement | null>>({});

  const select = (id: TabId, focus = false) => {
    setParams(
      (p) => {
        const next = new URLSearchParams(p);
        next.set('tab', id);
        return next;
      },
      { replace: true },
    );
    if (focus) tabRefs.current[id]?.focus();
  };

  // Arrow keys move between tabs, Home/End jump to the ends (WAI-ARIA tabs pattern, automatic activation).
  const onKeyDown = (e: KeyboardEvent) => {
    // From the focused tab: it is normally the selected one, but a click elsewhere can leave it apart.
    const focused = TABS.findIndex((t) => tabRefs.current[t.id] === e.target);
    const i = focused >= 0 ? focused : TABS.findIndex((t) => t.id === current);
    const to =
      e.key === 'ArrowRight'
        ? (i + 1) % TABS.length
        : e.key === 'ArrowLeft'
          ? (i - 1 + TABS.length) % TABS.length
          : e.key === 'Home'
            ? 0
            : e.key === 'End'
              ? TABS.length - 1
              : -1;
    const tab = TABS[to];
    if (!tab) return;
    e.preventDefault();
    select(tab.id, true);
  };

  return (
    <Page title="Reference">
      <div role="tablist" aria-label="Reference data" className="mb-4 flex gap-1 border-b border-rule" onKeyDown={onKeyDown}>
        {TABS.map((t) => {
          const selected = t.id === current;
          return (
            <button
              key={t.id}
              ref={(el) => {
                tabRefs.current[t.id] = el;
              }}
              type="button"
              role="tab"
              id={`tab-${t.id}`}
              aria-selected={selected}
              aria-controls={`panel-${t.id}`}
              tabIndex={selected ? 0 : -1}
              onClick={() => select(t.id)}
              className={`-mb-px rounded-t border px-3 py-1.5 text-sm ${
                selected ? 'border-rule border-b-paper bg-paper font-semibold text-ink' : 'border-transparent text-ink-soft hover:bg-paper-deep'
              }`}
            >
              {t.label}
            </button>
          );
        })}
      </div>
      <div role="tabpanel" id={`panel-${current}`} aria-labelledby={`tab-${current}`}>
        {current === 'species' && <SpeciesPanel />}
        {current === 'resins' && <ResinsPanel />}
        {current === 'lots' && <LotsPanel />}
      </div>
    </Page>
  );
}
