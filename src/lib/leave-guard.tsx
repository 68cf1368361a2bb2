import { useEffect, useRef } from 'react';
import { useBlocker } from 'react-router-dom';

/**
 * Keeps typed, unsaved work from being lost by leaving: a reload or a closed tab gets the browser's own
 * warning, and a link inside the app asks first (React Router's blocker). Render the returned element
 * where the question should appear.
 */
export function useLeaveGuard(active: boolean, what: string) {
  const blocker = useBlocker(({ currentLocation, nextLocation }) => active && currentLocation.pathname !== nextLocation.pathname);
  useEffect(() => {
    if (!active) return;
    const warn = (e: BeforeUnloadEvent) => e.preventDefault();
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [active]);
  const stay = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    if (blocker.state === 'blocked') stay.current?.focus();
  }, [blocker.state]);
  if (blocker.state !== 'blocked') return null;
  return (
    <div role="alertdialog" aria-modal="false" aria-labelledby="leave-guard-title" aria-describedby="leave-guard-text" className="sheet mb-4 border-margin p-4">
      <h2 id="leave-guard-title" className="text-base">
        Leave with unsaved values?
      </h2>
      <p id="leave-guard-text" className="mb-3 text-sm">
        {what} This browser keeps a draft of them, but they are not saved in Lumenbook until you save.
      </p>
      <div className="flex flex-wrap gap-2">
        <button ref={stay} type="button" className="btn-primary" onClick={() => blocker.reset?.()}>
          Stay and keep them
        </button>
        <button type="button" className="btn-quiet" onClick={() => blocker.proceed?.()}>
          Leave without saving
        </button>
      </div>
    </div>
  );
}
