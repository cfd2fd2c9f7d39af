import { createContext, useContext } from 'react';
import type { StudyRecord } from '../../shared/study/schema';
import type { SaveState } from './use-autosave';

export interface StudyContextValue {
  study: StudyRecord;
  locked: boolean;
  save: { state: SaveState; flush: () => Promise<void>; loadSaved: (s: StudyRecord) => void; keepMine: (s: StudyRecord) => void };
}

export const StudyContext = createContext<StudyContextValue | null>(null);

export function useStudyContext(): StudyContextValue {
  const value = useContext(StudyContext);
  if (!value) throw new Error('useStudyContext outside a study screen');
  return value;
}
