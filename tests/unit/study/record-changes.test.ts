import { describe, expect, it } from 'vitest';
import { changeText, recordChanges } from '../../../shared/study/record-changes';

// What an addendum changed, field by field (common practice: an amended report says what was
// corrected, from what to what, beside the reason).
const record = (over: Record<string, unknown> = {}) => ({
  id: 's1',
  accession: 'A-1',
  version: 3,
  updatedAt: '2026-12-01T10:00:00.000Z',
  patient: { mrn: 'M1', familyName: 'Invented', givenName: 'Ada', birthDate: '1960-01-01', sex: 'female' },
  details: { accessSite: 'right-radial', guideFrench: 6 },
  setup: { heparinUnits: 5000 },
  vessels: [{ id: 'v1', vessel: 'LAD', hyperemiaPd: 83, restTransit: [0.8, 0.7] }],
  vasoreactivity: { doses: [] },
  findings: { complications: 'None', complicationKinds: ['none'] },
  ...over,
});

describe('recordChanges', () => {
  it('is empty for the same record, whatever its version and saving time', () => {
    expect(recordChanges(record(), record({ version: 4, updatedAt: '2026-12-02T10:00:00.000Z' }))).toEqual([]);
  });

  it('names a changed field with its old and new value, in words', () => {
    const changes = recordChanges(record(), record({ details: { accessSite: 'right-femoral', guideFrench: 6 } }));
    expect(changes.map(changeText)).toEqual(['Procedure › Access site: right radial, changed to right femoral']);
  });

  it('finds a vessel row by its id and names it by its artery', () => {
    const after = record({ vessels: [{ id: 'v1', vessel: 'LAD', hyperemiaPd: 80, restTransit: [0.8, 0.7] }] });
    expect(recordChanges(record(), after).map(changeText)).toEqual(['Vessels › LAD › Pd at hyperaemia: 83, changed to 80']);
  });

  it('says a row was added or removed as one change', () => {
    const added = record({ vessels: [{ id: 'v1', vessel: 'LAD', hyperemiaPd: 83, restTransit: [0.8, 0.7] }, { id: 'v2', vessel: 'RCA', hyperemiaPd: 90 }] });
    expect(recordChanges(record(), added).map(changeText)).toEqual(['Vessels › RCA: added']);
    expect(recordChanges(added, record()).map(changeText)).toEqual(['Vessels › RCA: removed']);
  });

  it('says a row was added to an empty list, or the last row removed, as one change', () => {
    const dosed = record({ vasoreactivity: { doses: [{ id: 'd1', vessel: 'LAD', micrograms: 2, constrictionPct: 10 }] } });
    const added = recordChanges(record(), dosed).map(changeText);
    expect(added).toHaveLength(1);
    expect(added[0]).toMatch(/: added$/);
    const removed = recordChanges(dosed, record()).map(changeText);
    expect(removed).toHaveLength(1);
    expect(removed[0]).toMatch(/: removed$/);
  });

  it('quotes free text without its full stop', () => {
    const changes = recordChanges(record(), record({ findings: { complications: 'Band removed after 2 hours.', complicationKinds: ['none'] } }));
    expect(changes.map(changeText)).toEqual(['Findings › Complications: None, changed to Band removed after 2 hours']);
  });

  it('reads empty and missing values as a person would', () => {
    const changes = recordChanges(record(), record({ setup: { heparinUnits: null } }));
    expect(changes.map(changeText)).toEqual(['Setup › Heparin: 5000, changed to empty']);
  });
});
