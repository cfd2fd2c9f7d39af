import { describe, expect, it } from 'vitest';
import { conflictKey, sameValue, threeWayMerge } from '../../../shared/study/merge';

// Three-way merge as version control systems define it (common practice: a change on one side wins,
// the same field changed differently on both sides is a conflict for a person to decide).

const setup = (heparinUnits: number | null, nitrateDoseMicrograms: number | null) => ({ heparinUnits, nitrateDoseMicrograms });

describe('threeWayMerge on plain fields', () => {
  const cases: { name: string; base: unknown; mine: unknown; theirs: unknown; merged: unknown; conflicts: string[] }[] = [
    { name: 'nobody changed anything', base: setup(1, 2), mine: setup(1, 2), theirs: setup(1, 2), merged: setup(1, 2), conflicts: [] },
    { name: 'only mine changed', base: setup(1, 2), mine: setup(5, 2), theirs: setup(1, 2), merged: setup(5, 2), conflicts: [] },
    { name: 'only theirs changed', base: setup(1, 2), mine: setup(1, 2), theirs: setup(1, 9), merged: setup(1, 9), conflicts: [] },
    { name: 'different fields of one section changed on each side', base: setup(1, 2), mine: setup(5, 2), theirs: setup(1, 9), merged: setup(5, 9), conflicts: [] },
    { name: 'same field changed to the same value', base: setup(1, 2), mine: setup(5, 2), theirs: setup(5, 2), merged: setup(5, 2), conflicts: [] },
    { name: 'same field changed differently: theirs kept until a person decides', base: setup(1, 2), mine: setup(5, 2), theirs: setup(7, 2), merged: setup(7, 2), conflicts: ['heparinUnits'] },
    { name: 'a field cleared on one side', base: setup(1, 2), mine: setup(null, 2), theirs: setup(1, 3), merged: setup(null, 3), conflicts: [] },
    { name: 'a list of plain values is one field', base: { t: [0.9, 0.9] }, mine: { t: [0.9, 0.8] }, theirs: { t: [0.7, 0.9] }, merged: { t: [0.7, 0.9] }, conflicts: ['t'] },
  ];
  it.each(cases)('$name', ({ base, mine, theirs, merged, conflicts }) => {
    const result = threeWayMerge(base, mine, theirs);
    expect(result.merged).toEqual(merged);
    expect(result.conflicts.map((c) => c.key)).toEqual(conflicts);
  });

  it('reports both values of a conflict and honours the choice', () => {
    const first = threeWayMerge(setup(1, 2), setup(5, 2), setup(7, 2));
    expect(first.conflicts[0]).toMatchObject({ base: 1, mine: 5, theirs: 7 });
    expect(threeWayMerge(setup(1, 2), setup(5, 2), setup(7, 2), { heparinUnits: 'mine' }).merged).toEqual(setup(5, 2));
    expect(threeWayMerge(setup(1, 2), setup(5, 2), setup(7, 2), { heparinUnits: 'theirs' }).merged).toEqual(setup(7, 2));
  });

  it('tells text in a number box (NaN) from an empty field', () => {
    expect(sameValue(Number.NaN, null)).toBe(false);
    expect(sameValue(Number.NaN, Number.NaN)).toBe(true);
    expect(threeWayMerge({ a: null }, { a: Number.NaN }, { a: null }).merged).toEqual({ a: Number.NaN });
  });
});

describe('threeWayMerge on rows matched by id', () => {
  const row = (id: string, restPa: number | null, restPd: number | null = null) => ({ id, vessel: 'LAD', restPa, restPd });
  const study = (...vessels: ReturnType<typeof row>[]) => ({ vessels });

  const cases: { name: string; base: unknown; mine: unknown; theirs: unknown; merged: unknown; conflicts: string[] }[] = [
    { name: 'each side edits a different field of the same row', base: study(row('a', 90)), mine: study(row('a', 100)), theirs: study(row('a', 90, 80)), merged: study(row('a', 100, 80)), conflicts: [] },
    { name: 'each side adds its own row', base: study(), mine: study(row('m', 1)), theirs: study(row('t', 2)), merged: study(row('m', 1), row('t', 2)), conflicts: [] },
    { name: 'mine removes a row theirs left alone', base: study(row('a', 1), row('b', 2)), mine: study(row('b', 2)), theirs: study(row('a', 1), row('b', 3)), merged: study(row('b', 3)), conflicts: [] },
    { name: 'theirs removes a row mine left alone', base: study(row('a', 1), row('b', 2)), mine: study(row('a', 1), row('b', 5)), theirs: study(row('b', 2)), merged: study(row('b', 5)), conflicts: [] },
    { name: 'mine removes a row theirs changed: a conflict, their row kept meanwhile', base: study(row('a', 1)), mine: study(), theirs: study(row('a', 4)), merged: study(row('a', 4)), conflicts: ['vessels.[a]'] },
    { name: 'the same field of the same row changed on both sides', base: study(row('a', 90)), mine: study(row('a', 100)), theirs: study(row('a', 95)), merged: study(row('a', 95)), conflicts: ['vessels.[a].restPa'] },
  ];
  it.each(cases)('$name', ({ base, mine, theirs, merged, conflicts }) => {
    const result = threeWayMerge(base, mine, theirs);
    expect(result.merged).toEqual(merged);
    expect(result.conflicts.map((c) => c.key)).toEqual(conflicts);
  });

  it('names the row a conflict is in, and a removal chosen by mine removes it', () => {
    const r = threeWayMerge(study(row('a', 90)), study(row('a', 100)), study(row('a', 95)));
    expect(r.conflicts[0].row).toMatchObject({ vessel: 'LAD' });
    const key = conflictKey(['vessels', { id: 'a' }]);
    expect(threeWayMerge(study(row('a', 1)), study(), study(row('a', 4)), { [key]: 'mine' }).merged).toEqual(study());
    // Theirs removed a row mine changed: choosing mine keeps it.
    expect(threeWayMerge(study(row('a', 1)), study(row('a', 4)), study(), { [key]: 'mine' }).merged).toEqual(study(row('a', 4)));
    expect(threeWayMerge(study(row('a', 1)), study(row('a', 4)), study(), { [key]: 'theirs' }).merged).toEqual(study());
  });
});
