import { describe, expect, it } from 'vitest';
import { draftKey, readDraft, writeDraft } from './local-draft';

/** An in-memory Web Storage (the browser's localStorage is not there in Node). */
function memoryStorage() {
  const m = new Map<string, string>();
  return { getItem: (k: string) => m.get(k) ?? null, setItem: (k: string, v: string) => void m.set(k, v), removeItem: (k: string) => void m.delete(k), m };
}

describe('drafts kept in this browser', () => {
  it('round-trips a grid draft per user and scope, and removes it when empty', () => {
    const s = memoryStorage();
    const key = draftKey(7, 'grid:{"runId":3}');
    expect(key).toBe('lumenbook:draft:7:grid:{"runId":3}');
    writeDraft(s, key, 'g|mm', { 12: { dry: '25.10' } }, new Date('2026-03-01T10:00:00Z'));
    expect(readDraft(s, key, 'g|mm')).toEqual({ value: { 12: { dry: '25.10' } }, savedAt: '2026-03-01T10:00:00.000Z' });
    writeDraft(s, key, 'g|mm', null);
    expect(readDraft(s, key, 'g|mm')).toBeNull();
  });

  it('does not restore values typed in other units, or an unreadable entry', () => {
    const s = memoryStorage();
    writeDraft(s, 'k', 'oz|in', { 1: { dry: '0.885' } });
    expect(readDraft(s, 'k', 'g|mm')).toBeNull();
    s.setItem('k', '{not json');
    expect(readDraft(s, 'k', 'oz|in')).toBeNull();
  });
});
