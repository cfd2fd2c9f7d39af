import type { PhysiologyInput } from '../physiology/schema';
import type { StudySections } from './schema';

type PhysiologyVessel = PhysiologyInput['vessels'][number];

const present = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * The physiology core's input from a (possibly incomplete) study record: a pressure set goes in only
 * when both Pa and Pd are there, a dose only when every one of its fields is, so a half-typed row
 * yields fewer indices rather than an error.
 */
export function toPhysiologyInput(record: Pick<StudySections, 'vessels' | 'vasoreactivity'>): PhysiologyInput {
  const vessels = record.vessels.map((v): PhysiologyVessel => {
    const out: PhysiologyVessel = { id: v.id, vessel: v.vessel };
    // A transit box still holding text (NaN in the form) is left out, so one bad box does not stop
    // every vessel's live result; the injection count then says what is missing.
    const restTmn = v.restTransit.filter(present);
    const hypTmn = v.hyperemiaTransit.filter(present);
    if (present(v.restPa) && present(v.restPd)) {
      out.rest = { pa: v.restPa, pd: v.restPd, ...(restTmn.length ? { tmn: restTmn } : {}) };
    }
    if (present(v.hyperemiaPa) && present(v.hyperemiaPd)) {
      out.hyperemia = { pa: v.hyperemiaPa, pd: v.hyperemiaPd, ...(hypTmn.length ? { tmn: hypTmn } : {}) };
    }
    if (present(v.consoleFfr)) out.ffr = v.consoleFfr;
    if (v.nhprKind && present(v.nhprValue)) out.nhpr = { kind: v.nhprKind, value: v.nhprValue };
    if (present(v.wedgePressure)) out.wedgePressure = v.wedgePressure;
    if (present(v.driftPdPa)) out.driftPdPa = v.driftPdPa;
    return out;
  });
  const doses = record.vasoreactivity.doses.flatMap((d) =>
    present(d.micrograms) && present(d.constrictionPct) && d.symptoms !== null && d.ischemicEcg !== null
      ? [{ vessel: d.vessel, micrograms: d.micrograms, constrictionPct: d.constrictionPct, symptoms: d.symptoms, ischemicEcg: d.ischemicEcg }]
      : [],
  );
  return { vessels, ...(doses.length ? { vasoreactivity: { doses } } : {}) };
}
