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

/** This tab's id: kept in sessionStorage, so it survives a reload of the tab but not a new tab. */
export function tabId(): string {
  try {
    const existing = globalThis.sessionStorage?.getItem('isobar.tab');
    if (existing) return existing;
    const id = Math.random().toString(36).slice(2, 10) + Date.now().toString(36);
    globalThis.sessionStorage?.setItem('isobar.tab', id);
    return id;
  } catch {
    return 'tab';
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
      out.push({ key, draft: JSON.parse(s.getItem(key)!) as LocalDraft });
    } catch {
      /* unreadable: ignore */
    }
  }
  return out;
}

/** Says this tab is alive (called while a study is open). */
export function heartbeat(): void {
  store()?.setItem(alivePrefix + tabId(), String(Date.now()));
}

function tabIsGone(tab: string): boolean {
  const seen = Number(store()?.getItem(alivePrefix + tab) ?? 0);
  return Date.now() - seen > tabGoneAfterMs;
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
    store()?.setItem(keyOf(draft.studyId, draft.tabId), JSON.stringify(draft));
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
