import { can, type Permission, type Role } from '../auth/permissions';
import type { StudyState } from './vocabulary';

/**
 * The study's life: recorded (draft), handed to a physician (awaiting signature), signed once, and
 * changed afterwards only through an addendum (amending → amended), each signature a new immutable
 * report version. One table, used by the server to refuse and by the screens to offer.
 */
export const studyActions = ['mark-ready', 'send-back', 'sign', 'open-addendum', 'sign-addendum', 'discard-addendum'] as const;
export type StudyAction = (typeof studyActions)[number];

/** The moves made without a signature: hand-off, send-back, opening or discarding an addendum. */
export const stateChanges = ['mark-ready', 'send-back', 'open-addendum', 'discard-addendum'] as const satisfies readonly StudyAction[];
export type StateChange = (typeof stateChanges)[number];

interface Transition {
  from: readonly StudyState[];
  /** The state after the action; 'previous' = the state the addendum was opened from. */
  to: StudyState | 'previous';
  permission: Permission;
  /** Whether the person must say why. */
  needsReason: boolean;
  label: string;
}

export const transitions: Readonly<Record<StudyAction, Transition>> = Object.freeze({
  'mark-ready': { from: ['draft'], to: 'awaiting-signature', permission: 'study:write', needsReason: false, label: 'Ready for review' },
  'send-back': { from: ['awaiting-signature'], to: 'draft', permission: 'study:sign', needsReason: true, label: 'Send back to draft' },
  sign: { from: ['draft', 'awaiting-signature'], to: 'signed', permission: 'study:sign', needsReason: false, label: 'Sign the report' },
  'open-addendum': { from: ['signed', 'amended'], to: 'amending', permission: 'study:sign', needsReason: false, label: 'Open an addendum' },
  'sign-addendum': { from: ['amending'], to: 'amended', permission: 'study:sign', needsReason: true, label: 'Sign the addendum' },
  'discard-addendum': { from: ['amending'], to: 'previous', permission: 'study:sign', needsReason: false, label: 'Discard the addendum' },
});

/** States whose record may be edited: before signing, and inside an open addendum. */
const editableStates: readonly StudyState[] = ['draft', 'awaiting-signature', 'amending'];
export const isEditable = (state: StudyState) => editableStates.includes(state);

export type TransitionRefusal = 'wrong-state' | 'not-permitted' | 'reason-required';

/** Whether `role` may take `action` on a study in `state` (and, when a reason is needed, gave one). */
export function checkTransition(state: StudyState, action: StudyAction, role: Role | null | undefined, reason?: string | null): TransitionRefusal | null {
  const t = transitions[action];
  if (!can(role, t.permission)) return 'not-permitted';
  if (!t.from.includes(state)) return 'wrong-state';
  if (t.needsReason && !(reason && reason.trim().length > 0)) return 'reason-required';
  return null;
}

/** The actions a role can take on a study in this state, in the order the screens offer them. */
export function availableActions(state: StudyState, role: Role | null | undefined): StudyAction[] {
  return studyActions.filter((a) => transitions[a].from.includes(state) && can(role, transitions[a].permission));
}
