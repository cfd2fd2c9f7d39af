/**
 * Allocation-free pre-check of the physiology input. It accepts only inputs that
 * `physiologyInputSchema` also accepts (tests check this against the schema on random inputs);
 * anything it declines goes through the zod schema, which stays the single authority and produces
 * the error. It exists so that validating well-formed input costs little next to the arithmetic.
 */
import { MAX_MICROGRAMS, MAX_PRESSURE, MAX_RATIO, MAX_TRANSIT, MIN_POSITIVE } from './schema';
import type { PhysiologyOutput } from './schema';
import { defaultThresholds } from './thresholds';

const hasOwn = Object.prototype.hasOwnProperty;
const objectProto = Object.prototype;

function isPlainObject(x: unknown): x is Record<string, unknown> {
  if (typeof x !== 'object' || x === null || Array.isArray(x)) return false;
  const p = Object.getPrototypeOf(x);
  return p === objectProto || p === null;
}

/** [MIN_POSITIVE, max] */
function inRange(x: unknown, max: number): boolean {
  return typeof x === 'number' && x >= MIN_POSITIVE && x <= max;
}

function isVesselCode(x: unknown): boolean {
  switch (x) {
    case 'LM':
    case 'LAD':
    case 'LCX':
    case 'RCA':
    case 'RAMUS':
    case 'DIAGONAL':
    case 'OBTUSE_MARGINAL':
    case 'PDA':
    case 'PLB':
    case 'GRAFT':
      return true;
    default:
      return false;
  }
}

function okPressureSet(x: unknown): boolean {
  if (!isPlainObject(x)) return false;
  let n = 0;
  for (const k in x) {
    if (k !== 'pa' && k !== 'pd' && k !== 'tmn') return false;
    n++;
  }
  // Explicit `undefined` members are left to the schema.
  const hasPressures = x.pa !== undefined || x.pd !== undefined;
  if (hasPressures && (!inRange(x.pa, MAX_PRESSURE) || !inRange(x.pd, MAX_PRESSURE))) return false;
  const tmn = x.tmn;
  if (tmn !== undefined) {
    if (!Array.isArray(tmn)) return false;
    for (let i = 0; i < tmn.length; i++) if (!inRange(tmn[i], MAX_TRANSIT)) return false;
  }
  return n === (hasPressures ? 2 : 0) + (tmn !== undefined ? 1 : 0);
}

function okVessel(x: unknown): boolean {
  if (!isPlainObject(x)) return false;
  for (const k in x) {
    switch (k) {
      case 'id':
      case 'vessel':
      case 'rest':
      case 'hyperemia':
      case 'ffr':
      case 'nhpr':
      case 'wedgePressure':
      case 'driftPdPa':
      case 'visualStenosisPct':
        if (x[k] === undefined) return false;
        break;
      default:
        return false;
    }
  }
  if (typeof x.id !== 'string' || x.id.length === 0 || !isVesselCode(x.vessel)) return false;
  if (x.rest !== undefined && !okPressureSet(x.rest)) return false;
  if (x.hyperemia !== undefined && !okPressureSet(x.hyperemia)) return false;
  if (x.ffr !== undefined && !inRange(x.ffr, MAX_RATIO)) return false;
  if (x.driftPdPa !== undefined && !inRange(x.driftPdPa, MAX_RATIO)) return false;
  if (x.wedgePressure !== undefined && !inRange(x.wedgePressure, MAX_PRESSURE)) return false;
  const stenosis = x.visualStenosisPct;
  if (stenosis !== undefined && !(typeof stenosis === 'number' && stenosis >= 0 && stenosis <= 100)) return false;
  const nhpr = x.nhpr;
  if (nhpr !== undefined) {
    if (!isPlainObject(nhpr)) return false;
    for (const k in nhpr) if (k !== 'kind' && k !== 'value') return false;
    const kind = nhpr.kind;
    if (kind !== 'whole-cycle' && kind !== 'diastolic' && kind !== 'full-cycle-minimum') return false;
    if (!inRange(nhpr.value, MAX_RATIO)) return false;
  }
  return true;
}

function okDose(x: unknown): boolean {
  if (!isPlainObject(x)) return false;
  for (const k in x) {
    if (k !== 'vessel' && k !== 'micrograms' && k !== 'constrictionPct' && k !== 'symptoms' && k !== 'ischemicEcg') {
      return false;
    }
  }
  const c = x.constrictionPct;
  return (
    isVesselCode(x.vessel) &&
    inRange(x.micrograms, MAX_MICROGRAMS) &&
    typeof c === 'number' &&
    c >= 0 &&
    c <= 100 &&
    typeof x.symptoms === 'boolean' &&
    typeof x.ischemicEcg === 'boolean'
  );
}

function okThresholds(x: unknown): boolean {
  if (!isPlainObject(x)) return false;
  for (const k in x) {
    if (!hasOwn.call(defaultThresholds, k)) return false;
    const v = x[k];
    // A tolerance of 0 is valid but unusual: left to the schema, like anything else doubtful.
    if (typeof v !== 'number' || !(v > 0) || v === Infinity) return false;
    if (k === 'minInjections' && !Number.isInteger(v)) return false;
    if ((k === 'spasmConstrictionPct' || k === 'endothelialDysfunctionPct' || k === 'obstructiveStenosisPct') && v > 100) return false;
    if ((k === 'pdAbovePaToleranceMmHg' || k === 'hyperemicAboveRestingTolerance') && v > 20) return false;
  }
  return true;
}

function okProcedure(x: unknown): boolean {
  if (!isPlainObject(x)) return false;
  for (const k in x) {
    const v = x[k];
    if (k === 'hyperemicAgent') {
      if (v !== 'adenosine' && v !== 'papaverine' && v !== 'other' && v !== 'none') return false;
    } else if (k === 'hyperemicRoute') {
      if (v !== 'intravenous' && v !== 'intracoronary') return false;
    } else if (k === 'nitratesBeforeAcetylcholine') {
      if (typeof v !== 'boolean' && v !== 'unknown') return false;
    } else return false;
  }
  return true;
}

function uniqueIds(vessels: readonly unknown[]): boolean {
  const n = vessels.length;
  if (n < 2) return true;
  if (n <= 16) {
    for (let i = 1; i < n; i++) {
      const id = (vessels[i] as { id: string }).id;
      for (let j = 0; j < i; j++) if ((vessels[j] as { id: string }).id === id) return false;
    }
    return true;
  }
  const seen = new Set<string>();
  for (let i = 0; i < n; i++) {
    const id = (vessels[i] as { id: string }).id;
    if (seen.has(id)) return false;
    seen.add(id);
  }
  return true;
}

/** True only when the input is certainly valid; false means "ask the schema". */
export function isCertainlyValid(x: unknown): x is PhysiologyOutput {
  if (!isPlainObject(x)) return false;
  for (const k in x) {
    if (k !== 'vessels' && k !== 'vasoreactivity' && k !== 'thresholds' && k !== 'procedure' && k !== 'angina') return false;
    if (x[k] === undefined) return false;
  }
  const vessels = x.vessels;
  if (!Array.isArray(vessels)) return false;
  for (let i = 0; i < vessels.length; i++) if (!okVessel(vessels[i])) return false;
  if (!uniqueIds(vessels)) return false;
  const vr = x.vasoreactivity;
  if (vr !== undefined) {
    if (!isPlainObject(vr)) return false;
    for (const k in vr) if (k !== 'doses') return false;
    const doses = vr.doses;
    if (!Array.isArray(doses)) return false;
    for (let i = 0; i < doses.length; i++) if (!okDose(doses[i])) return false;
  }
  if (x.thresholds !== undefined && !okThresholds(x.thresholds)) return false;
  if (x.procedure !== undefined && !okProcedure(x.procedure)) return false;
  if (x.angina !== undefined && typeof x.angina !== 'boolean') return false;
  return true;
}
