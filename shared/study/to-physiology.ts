import { MAX_MICROGRAMS, MAX_PRESSURE, MAX_RATIO, MAX_TRANSIT, MIN_POSITIVE, type PhysiologyInput, type ProcedureInput } from '../physiology/schema';
import type { StudySections } from './schema';

type PhysiologyVessel = PhysiologyInput['vessels'][number];

/** A number the physiology core accepts for a quantity with these limits; anything else is left out. */
const within = (min: number, max: number) => (v: number | null | undefined): v is number =>
  typeof v === 'number' && Number.isFinite(v) && v >= min && v <= max;
const pressure = within(MIN_POSITIVE, MAX_PRESSURE);
const ratio = within(MIN_POSITIVE, MAX_RATIO);
const transit = within(MIN_POSITIVE, MAX_TRANSIT);
const percent = within(0, 100);
const micrograms = within(MIN_POSITIVE, MAX_MICROGRAMS);

/**
 * The physiology core's input from a (possibly incomplete, possibly mistyped) study record. A value
 * the core could not accept — a box still holding text, a negative pressure typed on the way to a
 * positive one — is left out, so one bad box never blanks every other live result; the form says
 * what is wrong with it. Pa and Pd go in together; transit times stand alone (CFR needs only them);
 * a dose goes in only when every one of its observations is there.
 */
export function toPhysiologyInput(
  record: Pick<StudySections, 'vessels' | 'vasoreactivity'> & { setup?: StudySections['setup']; details?: Pick<StudySections['details'], 'anginaPresent'> },
): PhysiologyInput {
  const vessels = record.vessels.map((v): PhysiologyVessel => {
    const out: PhysiologyVessel = { id: v.id, vessel: v.vessel };
    const restTmn = v.restTransit.filter(transit);
    const hypTmn = v.hyperemiaTransit.filter(transit);
    const restPressures = pressure(v.restPa) && pressure(v.restPd) ? { pa: v.restPa, pd: v.restPd } : {};
    const hypPressures = pressure(v.hyperemiaPa) && pressure(v.hyperemiaPd) ? { pa: v.hyperemiaPa, pd: v.hyperemiaPd } : {};
    if ('pa' in restPressures || restTmn.length) out.rest = { ...restPressures, ...(restTmn.length ? { tmn: restTmn } : {}) };
    if ('pa' in hypPressures || hypTmn.length) out.hyperemia = { ...hypPressures, ...(hypTmn.length ? { tmn: hypTmn } : {}) };
    if (ratio(v.consoleFfr)) out.ffr = v.consoleFfr;
    if (v.nhprKind && ratio(v.nhprValue)) out.nhpr = { kind: v.nhprKind, value: v.nhprValue };
    if (pressure(v.wedgePressure)) out.wedgePressure = v.wedgePressure;
    if (ratio(v.driftPdPa)) out.driftPdPa = v.driftPdPa;
    if (percent(v.visualStenosisPct)) out.visualStenosisPct = v.visualStenosisPct;
    return out;
  });
  const doses = record.vasoreactivity.doses.flatMap((d) =>
    micrograms(d.micrograms) && percent(d.constrictionPct) && d.symptoms !== null && d.ischemicEcg !== null
      ? [{ vessel: d.vessel, micrograms: d.micrograms, constrictionPct: d.constrictionPct, symptoms: d.symptoms, ischemicEcg: d.ischemicEcg }]
      : [],
  );
  const procedure = record.setup ? toProcedure(record.setup, doses.length > 0) : undefined;
  // Angina as the record says it; not recorded stays absent (the core then does not call findings angina).
  const angina = record.details?.anginaPresent;
  return {
    vessels,
    ...(doses.length ? { vasoreactivity: { doses } } : {}),
    ...(procedure && Object.keys(procedure).length ? { procedure } : {}),
    ...(typeof angina === 'boolean' ? { angina } : {}),
  };
}

/** The facts of the procedure that some quality checks need. */
function toProcedure(setup: StudySections['setup'], acetylcholineGiven: boolean): ProcedureInput {
  const out: ProcedureInput = {};
  if (setup.hyperemicAgent) out.hyperemicAgent = setup.hyperemicAgent;
  if (setup.hyperemicRoute) out.hyperemicRoute = setup.hyperemicRoute;
  // Only meaningful when acetylcholine was tested; "given" with no timing is passed on as unknown
  // (then a negative test cannot exclude spasm).
  if (acetylcholineGiven && setup.nitratesGiven !== null) {
    if (setup.nitratesGiven === false) out.nitratesBeforeAcetylcholine = false;
    else out.nitratesBeforeAcetylcholine = setup.nitrateTiming ? setup.nitrateTiming === 'before-measurements' : 'unknown';
  }
  return out;
}
