import { useCallback, useEffect, useRef, useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import { useQueryClient } from '@tanstack/react-query';
import { sectionNames, studySectionsSchema, type SectionName, type StudyRecord, type StudySections } from '../../shared/study/schema';
import { ApiError } from '../data/api';
import { patchStudyRequest, studyKeys } from '../data/study-query';
import { clearDraft, farewell, heartbeat, tabId, toStableJson, writeDraft } from './draft-store';

export type SaveState =
  | { kind: 'saved'; at: Date | null }
  | { kind: 'pending' }
  | { kind: 'saving' }
  | { kind: 'offline' }
  | { kind: 'invalid'; sections: SectionName[] }
  | { kind: 'conflict'; current: StudyRecord }
  /** Stops retrying: the user must act (sign in again, or the study was signed meanwhile). */
  | { kind: 'stopped'; reason: 'signed-out' | 'signed' | 'refused' | 'gone'; message: string };

export const sectionsOf = (s: StudySections): StudySections => ({
  patient: s.patient,
  details: s.details,
  setup: s.setup,
  vessels: s.vessels,
  vasoreactivity: s.vasoreactivity,
  findings: s.findings,
  coding: s.coding,
});

/** Equality that tells NaN (uncorrected text in a number box) from an empty field. */
const same = (a: unknown, b: unknown) => toStableJson(a) === toStableJson(b);
// structuredClone keeps NaN (the mark of text in a number box), which a JSON round trip would turn into null.
const clone = <T,>(v: T): T => structuredClone(v);
const fieldOfPointer = (pointer: string) => pointer.split('/').slice(1).map((p) => p.replaceAll('~1', '/').replaceAll('~0', '~')).join('.');
const validSection = (n: SectionName, value: unknown) => studySectionsSchema.shape[n].safeParse(value).success;

const debounceMs = 700;
const retryMs = 5000;

export interface AutosaveStart {
  /** The version and server copy the form's values were based on (a restored draft's, or the study's). */
  baseVersion: number;
  base: StudySections;
  userId: string;
}

/**
 * Saves a study without a save button. Every change is kept on the device at once, with the server
 * copy it was based on; after a pause the changed sections are sent with that version. Offline: retried
 * when the network returns. Stale: the user chooses to load the saved version or to put theirs on top,
 * section by section. Leaving the study or hiding the tab sends what is pending straight away.
 */
export function useAutosave(study: StudyRecord, form: UseFormReturn<StudySections>, start: AutosaveStart, locked = false) {
  const queryClient = useQueryClient();
  const version = useRef(start.baseVersion);
  const server = useRef<StudySections>(clone(start.base));
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const inFlight = useRef(false);
  const again = useRef(false);
  const stopped = useRef(false);
  const unmounted = useRef(false);
  /** Sections the server refused as they stand (e.g. an MRN of another patient): not resent until they change. */
  const heldBack = useRef(new Map<SectionName, string>());
  const [state, setStateNow] = useState<SaveState>({ kind: 'saved', at: null });
  // After the editor is gone, a last send may still finish: it must not touch state, timers or drafts.
  const setState: typeof setStateNow = (v) => {
    if (!unmounted.current) setStateNow(v);
  };

  const dirtySections = useCallback((values: StudySections) => sectionNames.filter((n) => !same(values[n], server.current[n])), []);

  const keepLocally = useCallback(() => {
    if (unmounted.current) return;
    const values = clone(form.getValues());
    if (dirtySections(values).length === 0) return clearDraft(study.id);
    writeDraft({ studyId: study.id, userId: start.userId, tabId: tabId(), baseVersion: version.current, base: server.current, sections: values, savedAt: Date.now() });
  }, [dirtySections, form, start.userId, study.id]);

  const flush = useCallback(
    async ({ keepalive = false } = {}) => {
      if (timer.current) clearTimeout(timer.current);
      timer.current = null;
      if (stopped.current) return;
      if (inFlight.current) {
        again.current = true;
        return;
      }
      const values = clone(form.getValues());
      for (const [n, held] of heldBack.current) if (held !== toStableJson(values[n])) heldBack.current.delete(n);
      // Sections with an entry that cannot be saved (e.g. text in a number box) wait for a correction,
      // and so do sections the server refused as they stand; the other sections still go.
      const invalid = sectionNames.filter((n) => !validSection(n, values[n]) || heldBack.current.has(n));
      const ready = dirtySections(values).filter((n) => !invalid.includes(n));
      if (ready.length === 0) {
        if (invalid.length) setState({ kind: 'invalid', sections: invalid });
        else {
          clearDraft(study.id);
          setState((s) => (s.kind === 'conflict' ? s : { kind: 'saved', at: s.kind === 'saved' ? s.at : new Date() }));
        }
        return;
      }
      inFlight.current = true;
      setState({ kind: 'saving' });
      const schedule = (ms: number) => {
        if (!unmounted.current) timer.current = setTimeout(() => void flush(), ms);
      };
      try {
        const body: Record<string, unknown> = { version: version.current };
        for (const n of ready) body[n] = values[n];
        const saved = await patchStudyRequest(study.id, body, { keepalive });
        version.current = saved.version;
        for (const n of ready) (server.current as Record<SectionName, unknown>)[n] = values[n];
        queryClient.setQueryData(studyKeys.detail(study.id), saved);
        void queryClient.invalidateQueries({ queryKey: studyKeys.lists() });
        keepLocally();
        const now = clone(form.getValues());
        const stillInvalid = sectionNames.filter((n) => !validSection(n, now[n]) || heldBack.current.has(n));
        const stillDirty = dirtySections(now).filter((n) => !stillInvalid.includes(n));
        if (stillDirty.length) {
          setState({ kind: 'pending' });
          again.current = true;
        } else if (stillInvalid.length) setState({ kind: 'invalid', sections: stillInvalid });
        else setState({ kind: 'saved', at: new Date() });
      } catch (error) {
        const status = error instanceof ApiError ? error.status : -1;
        const problem = error instanceof ApiError ? (error.problem as ApiError['problem'] & { current?: StudyRecord }) : undefined;
        const stop = (reason: 'signed-out' | 'signed' | 'refused' | 'gone', message: string) => {
          stopped.current = true;
          setState({ kind: 'stopped', reason, message });
        };
        const type = problem?.type?.split('/').pop();
        if (status === 0) {
          setState({ kind: 'offline' });
          schedule(retryMs);
        } else if (status === 409 && type === 'stale-version' && problem?.current) {
          const theirs = sectionsOf(problem.current);
          const mine = clone(form.getValues());
          if (sectionNames.every((n) => same(mine[n], theirs[n]))) {
            // The newer version holds exactly what this tab has: our own save whose answer was lost
            // (a save sent as the page was hidden or reloaded). Nothing to choose between.
            version.current = problem.current.version;
            server.current = clone(theirs);
            queryClient.setQueryData(studyKeys.detail(study.id), problem.current);
            keepLocally();
            setState({ kind: 'saved', at: new Date() });
          } else {
            setState({ kind: 'conflict', current: problem.current });
          }
        } else if ((status === 400 || status === 409 || status === 422) && problem?.errors?.length) {
          const refused = new Set<SectionName>();
          for (const e of problem.errors) {
            form.setError(fieldOfPointer(e.pointer) as never, { type: 'server', message: e.detail });
            const section = e.pointer.split('/')[1] as SectionName;
            if (sectionNames.includes(section)) refused.add(section);
          }
          for (const n of refused) heldBack.current.set(n, toStableJson(values[n]));
          setState({ kind: 'invalid', sections: [...refused] });
          // The sections the server did not object to go out on their own.
          if (ready.some((n) => !refused.has(n))) again.current = true;
        } else if (status === 401) {
          stop('signed-out', 'Your session has ended. Your edits are kept on this device: sign in again to send them.');
        } else if (status === 409 && type === 'study-signed') {
          stop('signed', 'The study was signed meanwhile, so these edits cannot be saved to it. They stay on this device; add them as an addendum.');
        } else if (status === 409) {
          stop('refused', `${problem?.detail ?? 'The change was refused.'} Reload the study.`);
        } else if (status === 403) {
          stop('refused', 'Your role may not change this study.');
        } else if (status === 404) {
          stop('gone', 'This study no longer exists.');
        } else {
          setState({ kind: 'offline' });
          schedule(retryMs * 2);
        }
      } finally {
        inFlight.current = false;
        if (again.current && !stopped.current) {
          again.current = false;
          if (unmounted.current) void flush({ keepalive: true });
          else schedule(debounceMs);
        }
      }
    },
    [dirtySections, form, keepLocally, queryClient, study.id],
  );

  useEffect(() => {
    if (locked) return;
    unmounted.current = false;
    heartbeat();
    const beat = setInterval(heartbeat, 5000);
    const subscription = form.watch(() => {
      keepLocally();
      setState((s) => (s.kind === 'conflict' || s.kind === 'offline' || s.kind === 'stopped' ? s : { kind: 'pending' }));
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void flush(), debounceMs);
    });
    const online = () => void flush();
    // Leaving or hiding the page sends what is pending now (keepalive lets it finish after unload).
    const hidden = () => {
      if (globalThis.document?.visibilityState === 'hidden') void flush({ keepalive: true });
    };
    const pagehide = () => {
      farewell();
      void flush({ keepalive: true });
    };
    globalThis.addEventListener?.('online', online);
    globalThis.addEventListener?.('pagehide', pagehide);
    globalThis.document?.addEventListener?.('visibilitychange', hidden);
    // A draft restored from this device at load time goes out straight away.
    if (dirtySections(form.getValues()).length) timer.current = setTimeout(() => void flush(), 50);
    return () => {
      subscription.unsubscribe();
      clearInterval(beat);
      globalThis.removeEventListener?.('online', online);
      globalThis.removeEventListener?.('pagehide', pagehide);
      globalThis.document?.removeEventListener?.('visibilitychange', hidden);
      // Leaving the study (back to the worklist): what waits for the debounce is sent now, once;
      // after that this editor schedules nothing and leaves the drafts to the next one.
      const pending = timer.current !== null;
      unmounted.current = true;
      if (pending) void flush({ keepalive: true });
    };
  }, [dirtySections, flush, form, keepLocally, locked]);

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

  /** Conflict: take the other writer's sections where this tab changed nothing since its base; send ours on top. */
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
