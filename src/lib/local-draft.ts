import { useEffect, useRef, useState } from 'react';

/** Where a draft lives in this browser; one per user and per screen (a grid of a run or of a trial). */
export function draftKey(userId: number | null | undefined, scope: string): string {
  return `lumenbook:draft:${userId ?? 'anonymous'}:${scope}`;
}

interface Stored<T> {
  /** What the values mean (e.g. the units they were typed in); a draft typed under another context is not restored. */
  context: string;
  savedAt: string;
  value: T;
}

/** Reads a draft, or null when there is none, it is unreadable, or it was typed in another context. */
export function readDraft<T>(storage: Pick<Storage, 'getItem'>, key: string, context: string): { value: T; savedAt: string } | null {
  try {
    const raw = storage.getItem(key);
    if (!raw) return null;
    const parsed = JSON.parse(raw) as Stored<T>;
    return parsed.context === context ? { value: parsed.value, savedAt: parsed.savedAt } : null;
  } catch {
    return null;
  }
}

export function writeDraft<T>(storage: Pick<Storage, 'setItem' | 'removeItem'>, key: string, context: string, value: T | null, now = new Date()): void {
  try {
    if (value === null) storage.removeItem(key);
    else storage.setItem(key, JSON.stringify({ context, savedAt: now.toISOString(), value } satisfies Stored<T>));
  } catch {
    // A full or disabled storage only costs the draft, never the screen.
  }
}

/**
 * Keeps a screen's unsaved values in this browser's storage as they are typed, so a crash, a reload or a
 * closed tab loses nothing: on mount a stored draft is handed to `restore`, and every change is written
 * back (`isEmpty` values remove it). Returns when a draft was restored, for the screen to say so.
 */
export function useLocalDraft<T>(key: string, context: string, value: T, isEmpty: (v: T) => boolean, restore: (v: T) => void): string | null {
  const [restoredAt, setRestoredAt] = useState<string | null>(null);
  const loaded = useRef<string | null>(null);
  useEffect(() => {
    if (loaded.current === key) return;
    loaded.current = key;
    const found = readDraft<T>(window.localStorage, key, context);
    if (found && !isEmpty(found.value)) {
      restore(found.value);
      setRestoredAt(found.savedAt);
    }
    // Restores once per key; later changes of `restore` do not matter.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, context]);
  useEffect(() => {
    if (loaded.current !== key) return;
    writeDraft(window.localStorage, key, context, isEmpty(value) ? null : value);
  }, [key, context, value, isEmpty]);
  return restoredAt;
}
