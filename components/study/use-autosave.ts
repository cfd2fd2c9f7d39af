import { useCallback, useEffect, useRef, useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import { useQueryClient } from '@tanstack/react-query';
import { sectionNames, studySectionsSchema, type SectionName, type StudyRecord, type StudySections } from '../../shared/study/schema';
import { ApiError } from '../data/api';
import { patchStudyRequest, studyKeys } from '../data/study-query';
import { clearDraft, writeDraft } from './draft-store';

export type SaveState =
  | { kind: 'saved'; at: Date | null }
  | { kind: 'pending' }
  | { kind: 'saving' }
  | { kind: 'offline' }
  | { kind: 'invalid'; sections: SectionName[] }
  | { kind: 'conflict'; current: StudyRecord }
  | { kind: 'error'; message: string };

export const sectionsOf = (s: StudySections): StudySections => ({
  patient: s.patient,
  details: s.details,
  setup: s.setup,
  vessels: s.vessels,
  vasoreactivity: s.vasoreactivity,
  findings: s.findings,
});

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);
const clone = <T,>(v: T): T => JSON.parse(JSON.stringify(v)) as T;
const fieldOfPointer = (pointer: string) => pointer.split('/').slice(1).map((p) => p.replaceAll('~1', '/').replaceAll('~0', '~')).join('.');

const debounceMs = 700;
const retryMs = 5000;

/**
 * Saves a study without a save button. Every change is kept locally at once; after a pause the
 * changed sections are sent with the version they were based on. Offline: retried when the
 * network returns. Stale: the user chooses to load the saved version or to put theirs on top.
 */
export function useAutosave(study: StudyRecord, form: UseFormReturn<StudySections>, initialBaseVersion: number, locked = false) {
  const queryClient = useQueryClient();
  const version = useRef(initialBaseVersion);
  const server = useRef<StudySections>(clone(sectionsOf(study)));
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const inFlight = useRef(false);
  const again = useRef(false);
  const [state, setState] = useState<SaveState>({ kind: 'saved', at: null });

  const dirtySections = useCallback(
    (values: StudySections) => sectionNames.filter((n) => !same(values[n], server.current[n])),
    [],
  );

  const flush = useCallback(async () => {
    if (timer.current) clearTimeout(timer.current);
    timer.current = null;
    if (inFlight.current) {
      again.current = true;
      return;
    }
    const values = clone(form.getValues());
    const dirty = dirtySections(values);
    if (dirty.length === 0) {
      clearDraft(study.id);
      setState((s) => (s.kind === 'conflict' ? s : { kind: 'saved', at: s.kind === 'saved' ? s.at : new Date() }));
      return;
    }
    const ready = dirty.filter((n) => studySectionsSchema.shape[n].safeParse(values[n]).success);
    const invalid = dirty.filter((n) => !ready.includes(n));
    if (ready.length === 0) {
      setState({ kind: 'invalid', sections: invalid });
      return;
    }
    inFlight.current = true;
    setState({ kind: 'saving' });
    try {
      const body: Record<string, unknown> = { version: version.current };
      for (const n of ready) body[n] = values[n];
      const saved = await patchStudyRequest(study.id, body);
      version.current = saved.version;
      for (const n of ready) (server.current as Record<SectionName, unknown>)[n] = values[n];
      queryClient.setQueryData(studyKeys.detail(study.id), saved);
      void queryClient.invalidateQueries({ queryKey: studyKeys.lists() });
      const still = dirtySections(form.getValues());
      if (still.length === 0) {
        clearDraft(study.id);
        setState({ kind: 'saved', at: new Date() });
      } else if (invalid.length && still.every((n) => invalid.includes(n))) {
        setState({ kind: 'invalid', sections: invalid });
      } else {
        setState({ kind: 'pending' });
        again.current = true;
      }
    } catch (error) {
      if (error instanceof ApiError && error.status === 0) {
        setState({ kind: 'offline' });
        timer.current = setTimeout(() => void flush(), retryMs);
      } else if (error instanceof ApiError && error.status === 409 && (error.problem as { current?: StudyRecord }).current) {
        setState({ kind: 'conflict', current: (error.problem as unknown as { current: StudyRecord }).current });
      } else if (error instanceof ApiError && error.status === 400 && error.problem.errors) {
        for (const e of error.problem.errors) form.setError(fieldOfPointer(e.pointer) as never, { type: 'server', message: e.detail });
        setState({ kind: 'invalid', sections: ready });
      } else {
        setState({ kind: 'error', message: error instanceof Error ? error.message : 'The change could not be saved.' });
        timer.current = setTimeout(() => void flush(), retryMs * 2);
      }
    } finally {
      inFlight.current = false;
      if (again.current) {
        again.current = false;
        timer.current = setTimeout(() => void flush(), debounceMs);
      }
    }
  }, [dirtySections, form, queryClient, study.id]);

  useEffect(() => {
    if (locked) return;
    const subscription = form.watch(() => {
      writeDraft(study.id, { baseVersion: version.current, sections: clone(form.getValues()), savedAt: Date.now() });
      setState((s) => (s.kind === 'conflict' || s.kind === 'offline' ? s : { kind: 'pending' }));
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void flush(), debounceMs);
    });
    const online = () => void flush();
    globalThis.addEventListener?.('online', online);
    // A draft restored from this device at load time goes out straight away.
    if (dirtySections(form.getValues()).length) timer.current = setTimeout(() => void flush(), 50);
    return () => {
      subscription.unsubscribe();
      globalThis.removeEventListener?.('online', online);
      if (timer.current) clearTimeout(timer.current);
    };
  }, [dirtySections, flush, form, locked, study.id]);

  /** Conflict: take the saved version and drop local edits. */
  const loadSaved = useCallback(
    (current: StudyRecord) => {
      version.current = current.version;
      server.current = clone(sectionsOf(current));
      clearDraft(study.id);
      form.reset(clone(sectionsOf(current)));
      queryClient.setQueryData(studyKeys.detail(study.id), current);
      setState({ kind: 'saved', at: new Date() });
    },
    [form, queryClient, study.id],
  );

  /** Conflict: take the other person's sections where this device changed nothing; send ours on top. */
  const keepMine = useCallback(
    (current: StudyRecord) => {
      const base = server.current;
      const mine = clone(form.getValues());
      const theirs = clone(sectionsOf(current));
      const merged = { ...mine } as Record<SectionName, unknown>;
      for (const n of sectionNames) if (same(mine[n], base[n])) merged[n] = theirs[n];
      version.current = current.version;
      server.current = theirs;
      form.reset(merged as StudySections);
      setState({ kind: 'pending' });
      void flush();
    },
    [flush, form],
  );

  return { state, flush, loadSaved, keepMine };
}
