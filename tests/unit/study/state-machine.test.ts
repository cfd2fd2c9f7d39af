import { describe, expect, it } from 'vitest';
import { roles } from '../../../shared/auth/permissions';
import { availableActions, checkTransition, isEditable, studyActions, transitions } from '../../../shared/study/state-machine';
import { studyStates, type StudyState } from '../../../shared/study/vocabulary';

// The report workflow is the product's own design (common practice: a signed report changes only by addendum).
describe('study state machine', () => {
  it.each([
    ['draft', 'mark-ready', 'staff', null],
    ['draft', 'mark-ready', 'coder', 'not-permitted'],
    ['awaiting-signature', 'mark-ready', 'staff', 'wrong-state'],
    ['awaiting-signature', 'send-back', 'physician', 'reason-required'],
    ['awaiting-signature', 'sign', 'physician', null],
    ['awaiting-signature', 'sign', 'staff', 'not-permitted'],
    ['draft', 'sign', 'physician', null],
    ['signed', 'sign', 'physician', 'wrong-state'],
    ['signed', 'open-addendum', 'physician', null],
    ['amended', 'open-addendum', 'physician', null],
    ['amending', 'sign-addendum', 'physician', 'reason-required'],
    ['amending', 'discard-addendum', 'physician', null],
    ['signed', 'discard-addendum', 'physician', 'wrong-state'],
    ['signed', 'open-addendum', 'chief', 'not-permitted'],
  ] as const)('%s + %s by %s → %s', (state, action, role, refusal) => {
    expect(checkTransition(state, action, role, null)).toBe(refusal);
  });

  it('a reason given with spaces only is no reason', () => {
    expect(checkTransition('awaiting-signature', 'send-back', 'physician', '   ')).toBe('reason-required');
    expect(checkTransition('awaiting-signature', 'send-back', 'physician', 'Second vessel missing')).toBeNull();
  });

  it('only drafts, studies awaiting signature and open addenda are editable; a signed study never is', () => {
    expect(studyStates.filter(isEditable)).toEqual(['draft', 'awaiting-signature', 'amending']);
  });

  it('offers each role exactly the actions the table and the permissions allow, and every state is reachable', () => {
    for (const state of studyStates) {
      for (const role of roles) {
        const offered = availableActions(state, role);
        for (const a of studyActions) expect(offered.includes(a)).toBe(checkTransition(state, a, role, 'a reason') === null);
      }
    }
    const reachable = new Set<StudyState>(['draft']);
    for (let i = 0; i < 5; i++) {
      for (const a of studyActions) {
        const t = transitions[a];
        if (t.to !== 'previous' && t.from.some((s) => reachable.has(s))) reachable.add(t.to);
      }
    }
    expect([...reachable].sort()).toEqual([...studyStates].sort());
  });
});
