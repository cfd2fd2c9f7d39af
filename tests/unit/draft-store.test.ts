import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';

/** A Storage of our own (the browser's localStorage / sessionStorage), shared between "tabs". */
class MemoryStorage {
  private map = new Map<string, string>();
  get length() {
    return this.map.size;
  }
  key(i: number) {
    return [...this.map.keys()][i] ?? null;
  }
  getItem(k: string) {
    return this.map.get(k) ?? null;
  }
  setItem(k: string, v: string) {
    this.map.set(k, String(v));
  }
  removeItem(k: string) {
    this.map.delete(k);
  }
  copy() {
    const c = new MemoryStorage();
    for (const [k, v] of this.map) c.setItem(k, v);
    return c;
  }
}

let local: MemoryStorage;
beforeEach(() => {
  local = new MemoryStorage();
  vi.stubGlobal('localStorage', local);
});
afterEach(() => vi.unstubAllGlobals());

/** A fresh page load (module state reset) with the given sessionStorage. */
async function loadPage(session: MemoryStorage) {
  vi.stubGlobal('sessionStorage', session);
  vi.resetModules();
  return import('../../components/study/draft-store');
}

import type { StudySections } from '../../shared/study/schema';

const sections = (contrastMl: number | null) => ({ findings: { complications: null, contrastMl, fluoroscopyMinutes: null, impression: null, plan: null } }) as unknown as StudySections;

describe('the draft store', () => {
  it('keeps NaN (uncorrected text in a number box) across a reload, apart from an empty field', async () => {
    const page = await loadPage(new MemoryStorage());
    expect(page.toStableJson({ a: Number.NaN })).not.toBe(page.toStableJson({ a: null }));
    expect(page.fromStableJson<{ a: number }>(page.toStableJson({ a: Number.NaN })).a).toBeNaN();
    page.writeDraft({ studyId: 's1', userId: 'u1', tabId: page.tabId(), baseVersion: 3, base: sections(120), sections: sections(Number.NaN), savedAt: 1 });
    const again = await loadPage(globalThis.sessionStorage as unknown as MemoryStorage);
    const draft = again.takeDraft('s1', 'u1');
    expect(draft?.baseVersion).toBe(3);
    expect(draft?.sections.findings.contrastMl).toBeNaN();
  });

  it('never gives one user the drafts of another', async () => {
    const page = await loadPage(new MemoryStorage());
    page.writeDraft({ studyId: 's1', userId: 'u1', tabId: page.tabId(), baseVersion: 1, base: sections(1), sections: sections(2), savedAt: 1 });
    expect(page.takeDraft('s1', 'u2')).toBeNull();
    expect(page.unsentStudies('u2')).toEqual([]);
    expect(page.unsentStudies('u1')).toEqual(['s1']);
  });

  it('gives a duplicated tab its own id while the original is alive, and keeps the id over a reload', async () => {
    const session = new MemoryStorage();
    const original = await loadPage(session);
    const id = original.tabId();
    original.heartbeat();
    const duplicate = await loadPage(session.copy());
    expect(duplicate.tabId()).not.toBe(id);
    // A reload says farewell first, so the same tab keeps its id.
    original.farewell();
    const reloaded = await loadPage(session);
    expect(reloaded.tabId()).toBe(id);
  });

  it('lets another tab take over the drafts of a tab that has closed, not of one that is open', async () => {
    const first = await loadPage(new MemoryStorage());
    first.heartbeat();
    first.writeDraft({ studyId: 's1', userId: 'u1', tabId: first.tabId(), baseVersion: 1, base: sections(1), sections: sections(2), savedAt: 1 });
    const second = await loadPage(new MemoryStorage());
    expect(second.takeDraft('s1', 'u1')).toBeNull();
    first.farewell();
    const taken = second.takeDraft('s1', 'u1');
    expect(taken?.tabId).toBe(second.tabId());
    expect(second.unsentStudies('u1')).toEqual(['s1']);
  });

  it('clears every draft and tab mark at sign-out', async () => {
    const page = await loadPage(new MemoryStorage());
    page.heartbeat();
    page.writeDraft({ studyId: 's1', userId: 'u1', tabId: page.tabId(), baseVersion: 1, base: sections(1), sections: sections(2), savedAt: 1 });
    page.clearAllDrafts();
    expect(local.length).toBe(0);
  });
});
