import { useCallback, useEffect, useRef, useState } from 'react';
import type { UseFormReturn } from 'react-hook-form';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SectionName, StudyRecord, StudySections } from '../../shared/study/schema';
import { threeWayMerge, type MergeChoice, type MergeConflict } from '../../shared/study/merge';
import { ApiError } from '../data/api';
import { patchStudyRequest, studyKeys } from '../data/study-query';
import { clearDraft, farewell, heartbeat, tabId, toStableJson, writeDraft } from './draft-store';
import { decideOnSaveError, formNameOf, pathOfPointer, planSave, saveRetryDelay, shouldRetrySave, valueAt, type SaveFailure, type StopReason } from './save-plan';

export type SaveState =
  | { kind: 'saved'; at: Date | null; mergedWith?: number }
  | { kind: 'pending' }
  | { kind: 'saving' }
  /** Not reaching the server; `gaveUp` once the bounded retries are spent (the next edit, reconnection or "Try now" sends). */
  | { kind: 'offline'; gaveUp?: boolean }
  /** Fields kept on this device until corrected (JSON pointers); the rest of their sections was sent. */
  | { kind: 'invalid'; sections: SectionName[]; fields: string[] }
  /** Another writer changed the same fields: the person chooses, field by field. */
  | { kind: 'conflict'; current: StudyRecord; conflicts: MergeConflict[] }
  /** Stops sending: the user must act (sign in again, or the study was signed meanwhile). */
  | { kind: 'stopped'; reason: StopReason; message: string };

export const sectionsOf = (s: StudySections): StudySections => ({
  patient: s.patient,
  details: s.details,
  setup: s.setup,
  vessels: s.vessels,
  vasoreactivity: s.vasoreactivity,
  findings: s.findings,
  coding: s.coding,
});

// structuredClone keeps NaN (the mark of text in a number box), which a JSON round trip would turn into null.
const clone = <T,>(v: T): T => structuredClone(v);
const failureOf = (error: unknown): SaveFailure =>
  error instanceof ApiError ? { status: error.status, problem: error.problem as SaveFailure['problem'] } : { status: -1 };

const debounceMs = 700;

export interface AutosaveStart {
  /** The version and server copy the form's values were based on (a restored draft's, or the study's). */
  baseVersion: number;
  base: StudySections;
  userId: string;
}

/**
 * Saves a study without a save button. Every change is kept on the device at once, with the server
 * copy it was based on; after a pause the changed fields are sent with that version (a field that
 * cannot be saved stays here, the rest goes). Failures that may pass are retried by the mutation
 * (TanStack Query pauses it while the browser is offline and resumes it when it is back). Stale:
 * merged field by field with the other writer's save; where both changed a field, the person chooses.
 */
export function useAutosave(study: StudyRecord, form: UseFormReturn<StudySections>, start: AutosaveStart, locked = false) {
  const queryClient = useQueryClient();
  const version = useRef(start.baseVersion);
  const server = useRef<StudySections>(clone(start.base));
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const inFlight = useRef(false);
  const again = useRef(false);
  const stopped = useRef(false);
  const conflict = useRef<StudyRecord | null>(null);
  /** The other writer's version merged in since the last save was confirmed (said once it is saved). */
  const merged = useRef<number | null>(null);
  const unmounted = useRef(false);
  /** Fields the server refused as they stand (pointer → refused value): not resent until they change. */
  const heldBack = useRef(new Map<string, string>());
  const [state, setStateNow] = useState<SaveState>({ kind: 'saved', at: null });
  // After the editor is gone, a last send may still finish: it must not touch state, timers or drafts.
  const setState: typeof setStateNow = (v) => {
    if (!unmounted.current) setStateNow(v);
  };

  const save = useMutation({
    mutationKey: ['studies', 'save', study.id],
    mutationFn: ({ body, keepalive }: { body: Record<string, unknown>; keepalive: boolean }) => patchStudyRequest(study.id, body, { keepalive }),
    networkMode: 'online',
    retry: (count, error) => shouldRetrySave(count, failureOf(error)),
    retryDelay: (count) => saveRetryDelay(count),
  });
  const mutate = save.mutateAsync;

  const plan = useCallback((values: StudySections) => {
    for (const [pointer, refused] of heldBack.current) if (toStableJson(valueAt(values, pathOfPointer(pointer))) !== refused) heldBack.current.delete(pointer);
    return planSave(values, server.current, heldBack.current, toStableJson);
  }, []);

  const keepLocally = useCallback(() => {
    if (unmounted.current) return;
    const values = clone(form.getValues());
    if (toStableJson(values) === toStableJson(server.current)) return clearDraft(study.id);
    writeDraft({ studyId: study.id, userId: start.userId, tabId: tabId(), baseVersion: version.current, base: server.current, sections: values, savedAt: Date.now() });
  }, [form, start.userId, study.id]);

  /** What the status line says when nothing is on its way. */
  const settle = useCallback((values: StudySections) => {
    const p = plan(values);
    if (Object.keys(p.send).length) {
      setState({ kind: 'pending' });
      return true;
    }
    if (p.held.length) setState({ kind: 'invalid', sections: [...new Set(p.held.map((h) => pathOfPointer(h)[0] as SectionName))], fields: p.held });
    else {
      clearDraft(study.id);
      const mergedWith = merged.current;
      setState((s) => (s.kind === 'saved' && !mergedWith ? s : { kind: 'saved', at: new Date(), mergedWith: mergedWith ?? undefined }));
    }
    return false;
  // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [plan, study.id]);

  const flush = useCallback(
    async ({ keepalive = false } = {}) => {
      if (timer.current) clearTimeout(timer.current);
      timer.current = null;
      if (stopped.current || conflict.current) return;
      if (inFlight.current) {
        again.current = true;
        return;
      }
      const values = clone(form.getValues());
      const p = plan(values);
      const ready = Object.keys(p.send) as SectionName[];
      if (ready.length === 0) {
        settle(values);
        return;
      }
      inFlight.current = true;
      setState({ kind: 'saving' });
      const schedule = (ms: number) => {
        if (!unmounted.current) timer.current = setTimeout(() => void flush(), ms);
      };
      try {
        const body: Record<string, unknown> = { version: version.current, ...p.send };
        // A send as the page goes away must start now: straight to fetch, not through the mutation's queue.
        const saved = keepalive ? await patchStudyRequest(study.id, body, { keepalive }) : await mutate({ body, keepalive });
        version.current = saved.version;
        server.current = { ...server.current, ...clone(p.send) } as StudySections;
        queryClient.setQueryData(studyKeys.detail(study.id), saved);
        void queryClient.invalidateQueries({ queryKey: studyKeys.lists() });
        keepLocally();
        if (settle(clone(form.getValues()))) again.current = true;
        else merged.current = null;
      } catch (error) {
        const decision = decideOnSaveError(failureOf(error));
        switch (decision.kind) {
          case 'retry':
            // The mutation has given up after its bounded tries, or a keepalive send failed: the edits
            // stay on this device until the next edit, the connection coming back, or "Try now".
            setState({ kind: 'offline', gaveUp: true });
            break;
          case 'stale': {
            const current = decision.current;
            const theirs = sectionsOf(current);
            const mine = clone(form.getValues());
            const merge = threeWayMerge(server.current, mine, theirs);
            queryClient.setQueryData(studyKeys.detail(study.id), current);
            if (merge.conflicts.length) {
              conflict.current = current;
              setState({ kind: 'conflict', current, conflicts: merge.conflicts });
              break;
            }
            // Nothing changed on both sides: take theirs where they changed, keep ours where we did.
            version.current = current.version;
            server.current = clone(theirs);
            if (toStableJson(merge.merged) !== toStableJson(mine)) form.reset(clone(merge.merged), { keepErrors: true });
            keepLocally();
            merged.current = current.version;
            if (settle(clone(form.getValues()))) again.current = true;
            break;
          }
          case 'fields': {
            for (const e of decision.errors) {
              const path = pathOfPointer(e.pointer);
              form.setError(formNameOf(path) as never, { type: 'server', message: e.detail });
              heldBack.current.set(e.pointer, toStableJson(valueAt(values, path)));
            }
            // The fields the server did not object to go out on their own.
            if (settle(clone(form.getValues()))) again.current = true;
            break;
          }
          case 'stop':
            stopped.current = true;
            if (decision.reason === 'forbidden') {
              // This role may not edit: what was typed here cannot be kept, so it does not linger after a reload.
              clearDraft(study.id);
              form.reset(clone(server.current));
            }
            setState({ kind: 'stopped', reason: decision.reason, message: decision.message });
            break;
        }
      } finally {
        inFlight.current = false;
        if (again.current && !stopped.current && !conflict.current) {
          again.current = false;
          if (unmounted.current) void flush({ keepalive: true });
          else schedule(debounceMs);
        }
      }
    },
    [form, keepLocally, mutate, plan, queryClient, settle, study.id],
  );

  useEffect(() => {
    if (locked) return;
    unmounted.current = false;
    heartbeat();
    const beat = setInterval(heartbeat, 5000);
    const subscription = form.watch(() => {
      keepLocally();
      if (conflict.current || stopped.current) return;
      setState((s) => (s.kind === 'offline' ? s : { kind: 'pending' }));
      if (timer.current) clearTimeout(timer.current);
      timer.current = setTimeout(() => void flush(), debounceMs);
    });
    // Leaving or hiding the page sends what is pending now (keepalive lets it finish after unload).
    const hidden = () => {
      if (globalThis.document?.visibilityState === 'hidden') void flush({ keepalive: true });
    };
    const pagehide = () => {
      farewell();
      void flush({ keepalive: true });
    };
    // The connection is back: send what waited, without waiting for the next edit.
    const online = () => {
      if (!timer.current && !inFlight.current) void flush();
    };
    globalThis.addEventListener?.('online', online);
    globalThis.addEventListener?.('pagehide', pagehide);
    globalThis.document?.addEventListener?.('visibilitychange', hidden);
    // A draft restored from this device at load time goes out straight away.
    if (toStableJson(form.getValues()) !== toStableJson(server.current)) timer.current = setTimeout(() => void flush(), 50);
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
  }, [flush, form, keepLocally, locked]);

  /** Conflict: take the saved version and drop local edits. */
  const loadSaved = useCallback(
    (current: StudyRecord) => {
      conflict.current = null;
      heldBack.current.clear();
      version.current = current.version;
      server.current = clone(sectionsOf(current));
      clearDraft(study.id);
      form.reset(clone(sectionsOf(current)));
      queryClient.setQueryData(studyKeys.detail(study.id), current);
      setState({ kind: 'saved', at: new Date() });
    },
    [form, queryClient, study.id],
  );

  /**
   * Conflict: merge field by field with the saved version; where both changed a field, `choices`
   * says whose value stays (the saved one unless the person picked theirs). Then send the result.
   */
  const resolve = useCallback(
    (current: StudyRecord, choices: Record<string, MergeChoice>) => {
      const theirs = clone(sectionsOf(current));
      const result = threeWayMerge(server.current, clone(form.getValues()), theirs, choices);
      conflict.current = null;
      version.current = current.version;
      server.current = theirs;
      form.reset(clone(result.merged), { keepErrors: true });
      keepLocally();
      setState({ kind: 'pending' });
      void flush();
    },
    [flush, form, keepLocally],
  );

  // While a send waits on the network (paused offline, or between retries), say so.
  const waiting = state.kind === 'saving' && (save.isPaused || save.failureCount > 0);
  return { state: waiting ? ({ kind: 'offline' } as SaveState) : state, flush, loadSaved, resolve };
}
