import { describe, expect, it } from 'vitest';
import { detailsSchema, emptyDetails, createStudySchema } from '../../../shared/study/schema';

// A procedure ends after it starts, compared as instants (ISO 8601 offsets), not as text (common practice).
describe('procedure end after start', () => {
  const details = (start: string, end: string) => ({ ...emptyDetails(), procedureStartedAt: start, procedureEndedAt: end });

  it('accepts an end written in another offset that is later in time though earlier as text', () => {
    // 10:00+02:00 is 08:00Z; an end at 09:00Z is an hour later.
    expect(detailsSchema.safeParse(details('2026-03-02T10:00:00+02:00', '2026-03-02T09:00:00Z')).success).toBe(true);
  });

  it('refuses an end before the start even when its text sorts later', () => {
    // 10:00-05:00 is 15:00Z; an end at 11:00Z is four hours earlier.
    const r = detailsSchema.safeParse(details('2026-03-02T10:00:00-05:00', '2026-03-02T11:00:00Z'));
    expect(r.success).toBe(false);
    expect(r.error?.issues[0].path).toEqual(['procedureEndedAt']);
  });

  it('applies the same rule to the partial details of a new study', () => {
    expect(createStudySchema.shape.details.safeParse({ procedureStartedAt: '2026-03-02T10:00:00-05:00', procedureEndedAt: '2026-03-02T11:00:00Z' }).success).toBe(false);
    expect(createStudySchema.shape.details.safeParse({ procedureStartedAt: '2026-03-02T10:00:00+02:00', procedureEndedAt: '2026-03-02T09:00:00Z' }).success).toBe(true);
  });
});
