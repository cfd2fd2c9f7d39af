import type { StudySections } from '../../shared/study/schema';

/**
 * Edits not yet confirmed by the server, kept in the browser so a reload or an outage loses nothing.
 * One draft per study per tab (two tabs never clear each other's edits), with the server copy the
 * edits were based on, so a later merge knows which sections this tab really changed.
 */
export interface LocalDraft {
  studyId: string;
  userId: string;
  tabId: string;
  baseVersion: number;
  base: StudySections;
  sections: StudySections;
  savedAt: number;
}

/**
 * JSON that keeps NaN — the mark of text in a number box that the user has not corrected yet — so a
 * reload shows the field as still wrong instead of quietly empty.
 */
const nanMark = '__isobar_nan__';
export const toStableJson = (v: unknown) => JSON.stringify(v, (_k, x) => (typeof x === 'number' && Number.isNaN(x) ? { [nanMark]: 1 } : x));
export const fromStableJson = <T,>(text: string): T =>
  JSON.parse(text, (_k, x) => (x && typeof x === 'object' && !Array.isArray(x) && x[nanMark] === 1 && Object.keys(x).length === 1 ? Number.NaN : x)) as T;

const prefix = 'isobar.draft.';
const alivePrefix = 'isobar.tab-alive.';
/** A tab that has not said it is alive for this long is gone; its drafts may be taken over. */
const tabGoneAfterMs = 15_000;

const store = () => {
  try {
    return globalThis.localStorage ?? null;
  } catch {
    return null;
  }
};

const randomId = () => Math.random().toString(36).slice(2, 10) + Date.now().toString(36);
/** Tells this page load apart from another tab that copied our sessionStorage (a duplicated tab). */
const loadNonce = randomId();
let cachedTabId: string | null = null;

/**
 * This tab's id, kept in sessionStorage so it survives a reload of the tab. A duplicated tab copies
 * it; when another live page already beats under the id, this page takes a new one.
 */
export function tabId(): string {
  if (cachedTabId) return cachedTabId;
  try {
    let id = globalThis.sessionStorage?.getItem('isobar.tab') ?? null;
    if (id) {
      const mark = readAlive(id);
      if (mark && mark.nonce !== loadNonce && Date.now() - mark.at < tabGoneAfterMs) id = null;
    }
    if (!id) {
      id = randomId();
      globalThis.sessionStorage?.setItem('isobar.tab', id);
    }
    cachedTabId = id;
    return id;
  } catch {
    cachedTabId = 'tab';
    return cachedTabId;
  }
}

function readAlive(tab: string): { nonce: string; at: number } | null {
  try {
    const text = store()?.getItem(alivePrefix + tab);
    return text ? (JSON.parse(text) as { nonce: string; at: number }) : null;
  } catch {
    return null;
  }
}

const keyOf = (studyId: string, tab: string) => `${prefix}${studyId}.${tab}`;

function allDrafts(): { key: string; draft: LocalDraft }[] {
  const s = store();
  if (!s) return [];
  const out: { key: string; draft: LocalDraft }[] = [];
  for (let i = 0; i < s.length; i++) {
    const key = s.key(i);
    if (!key?.startsWith(prefix)) continue;
    try {
      out.push({ key, draft: fromStableJson<LocalDraft>(s.getItem(key)!) });
    } catch {
      /* unreadable: ignore */
    }
  }
  return out;
}

/** Says this tab is alive (called while a study is open). */
export function heartbeat(): void {
  store()?.setItem(alivePrefix + tabId(), JSON.stringify({ nonce: loadNonce, at: Date.now() }));
}

/** The tab is closing or reloading: its drafts may be taken over at once. */
export function farewell(): void {
  const mark = readAlive(tabId());
  if (mark?.nonce === loadNonce) store()?.removeItem(alivePrefix + tabId());
}

function tabIsGone(tab: string): boolean {
  const mark = readAlive(tab);
  return !mark || Date.now() - mark.at > tabGoneAfterMs;
}

/**
 * The draft to restore when a study opens: this tab's own, else the newest left behind by a tab that
 * has gone (closed while offline, say) — taken over by this tab. Another user's drafts are never used.
 */
export function takeDraft(studyId: string, userId: string): LocalDraft | null {
  const own = tabId();
  const mine = allDrafts().filter((d) => d.draft.studyId === studyId && d.draft.userId === userId);
  const ownDraft = mine.find((d) => d.draft.tabId === own);
  if (ownDraft) return ownDraft.draft;
  const orphan = mine.filter((d) => tabIsGone(d.draft.tabId)).sort((a, b) => b.draft.savedAt - a.draft.savedAt)[0];
  if (!orphan) return null;
  store()?.removeItem(orphan.key);
  const adopted = { ...orphan.draft, tabId: own };
  writeDraft(adopted);
  return adopted;
}

export function writeDraft(draft: LocalDraft): void {
  try {
    store()?.setItem(keyOf(draft.studyId, draft.tabId), toStableJson(draft));
  } catch {
    /* storage full or disabled: the server copy is still there */
  }
}

/** Removes this tab's draft of a study only. */
export function clearDraft(studyId: string): void {
  store()?.removeItem(keyOf(studyId, tabId()));
}

/** Studies with edits on this device that the server has not confirmed. */
export function unsentStudies(userId: string): string[] {
  return [...new Set(allDrafts().filter((d) => d.draft.userId === userId).map((d) => d.draft.studyId))];
}

/** Written at sign-out so the other open tabs follow (they listen for it). */
export const signedOutKey = 'isobar.signed-out';

/** Tells the other tabs of this browser that the session has ended. */
export function announceSignOut(): void {
  store()?.setItem(signedOutKey, String(Date.now()));
}

/** At sign-out: no patient data stays behind on a shared workstation. */
export function clearAllDrafts(): void {
  const s = store();
  if (!s) return;
  for (const { key } of allDrafts()) s.removeItem(key);
  for (let i = s.length - 1; i >= 0; i--) {
    const key = s.key(i);
    if (key?.startsWith(alivePrefix)) s.removeItem(key);
  }
}
