import type { StudySections } from '../../shared/study/schema';

/** Edits not yet confirmed by the server, kept in the browser so a reload or an outage loses nothing. */
export interface LocalDraft {
  baseVersion: number;
  sections: StudySections;
  savedAt: number;
}

const keyOf = (studyId: string) => `isobar.draft.${studyId}`;

export function readDraft(studyId: string): LocalDraft | null {
  try {
    const text = globalThis.localStorage?.getItem(keyOf(studyId));
    return text ? (JSON.parse(text) as LocalDraft) : null;
  } catch {
    return null;
  }
}

export function writeDraft(studyId: string, draft: LocalDraft): void {
  try {
    globalThis.localStorage?.setItem(keyOf(studyId), JSON.stringify(draft));
  } catch {
    /* storage full or disabled: the server copy is still there */
  }
}

export function clearDraft(studyId: string): void {
  try {
    globalThis.localStorage?.removeItem(keyOf(studyId));
  } catch {
    /* nothing to do */
  }
}
