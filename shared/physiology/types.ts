import type { NhprKind, VesselCode } from './schema';

export type Flag = 'normal' | 'abnormal' | 'borderline';

export interface PhysiologyWarning {
  code: string;
  message: string;
}

export type ImrMethod = 'pd-tmn' | 'wedge' | 'yong';

export interface VesselResult {
  id: string;
  vessel: VesselCode;
  /** Pd/Pa at hyperaemia, or the entered console value. */
  ffr?: number;
  ffrFlag?: Flag;
  ffrSource?: 'pressures' | 'entered';
  /** FFR from the grey-zone lower limit up to the FFR cut-off (a note; the flag stays abnormal). */
  ffrGreyZone?: boolean;
  restingPdPa?: number;
  restingPdPaFlag?: Flag;
  /** The entered resting ratio, echoed with its kind. */
  nhpr?: number;
  nhprKind?: NhprKind;
  nhprFlag?: Flag;
  tmnRest?: number;
  tmnHyperemia?: number;
  cfr?: number;
  cfrFlag?: Flag;
  imr?: number;
  imrFlag?: Flag;
  imrUncorrected?: number;
  imrMethod?: ImrMethod;
  rrr?: number;
  rrrFlag?: Flag;
  mrr?: number;
  mrrFlag?: Flag;
  warnings: PhysiologyWarning[];
}

export type VasoreactivityOutcome =
  | 'epicardial-spasm'
  | 'microvascular-spasm'
  | 'endothelial-dysfunction'
  | 'negative';

/** The contract's vasoreactivity result: exactly the study's outcome. */
export interface VasoreactivityResult {
  result: VasoreactivityOutcome;
}

/** Classification of one acetylcholine dose. */
export interface DoseResult {
  vessel: VesselCode;
  micrograms: number;
  result: VasoreactivityOutcome;
}

export type Endotype =
  | 'obstructive'
  | 'microvascular-angina'
  | 'vasospastic-angina'
  | 'mixed'
  | 'no-abnormality'
  | 'inconclusive';

export interface Findings {
  obstructive: boolean;
  microvascular: null | 'structural' | 'functional';
  vasospasm: null | 'epicardial' | 'microvascular';
}

export interface PhysiologyResult {
  vessels: VesselResult[];
  vasoreactivity?: VasoreactivityResult;
  /** Each acetylcholine dose's classification, in input order (present with vasoreactivity). */
  doseResults?: DoseResult[];
  /** Warnings about the study as a whole (acetylcholine doses); vessel warnings stay on each vessel. */
  warnings: PhysiologyWarning[];
  findings: Findings;
  endotype: Endotype;
  reasons: string[];
}
