import { createContext, useContext } from 'react';
import type { StudyRecord } from '../../shared/study/schema';
import type { MergeChoice } from '../../shared/study/merge';
import type { SaveState } from './use-autosave';

export interface StudyContextValue {
  study: StudyRecord;
  locked: boolean;
  save: { state: SaveState; flush: () => Promise<void>; loadSaved: (s: StudyRecord) => void; resolve: (s: StudyRecord, choices: Record<string, MergeChoice>) => void };
  /** Why the form is read only, when it is. */
  readOnlyReason: string | null;
}

export const StudyContext = createContext<StudyContextValue | null>(null);

export function useStudyContext(): StudyContextValue {
  const value = useContext(StudyContext);
  if (!value) throw new Error('useStudyContext outside a study screen');
  return value;
}
