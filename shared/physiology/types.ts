import type { NhprKind, VesselCode } from './schema';

export const flags = ['normal', 'abnormal', 'borderline'] as const;
export type Flag = (typeof flags)[number];

export interface PhysiologyWarning {
  code: string;
  message: string;
}

export const imrMethods = ['pd-tmn', 'wedge', 'yong'] as const;
export type ImrMethod = (typeof imrMethods)[number];

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
  /** MRR comes from bolus thermodilution here; its cut-offs were set with continuous thermodilution. */
  mrrMethod?: 'bolus-thermodilution';
  /** The entered angiographic diameter stenosis, echoed. */
  visualStenosisPct?: number;
  /** Whether the vessel is obstructive, and by what it was judged; absent when nothing judges it. */
  obstructive?: boolean;
  judgedBy?: 'ffr' | 'nhpr' | 'resting-pd-pa' | 'visual-stenosis';
  /**
   * This vessel's microvascular finding, from its own CFR and IMR (never combined across vessels); set
   * only where obstruction was excluded in the vessel and the type can be decided. The study's
   * `findings.microvascular` is the most severe of these.
   */
  microvascular?: 'structural' | 'functional' | 'raised-imr';
  /**
   * True when this vessel's CFR or IMR shows coronary microvascular dysfunction where obstruction was
   * excluded, whether or not its type can be decided (absent otherwise).
   */
  microvascularDysfunction?: true;
  warnings: PhysiologyWarning[];
}

export const vasoreactivityOutcomes = [
  'epicardial-spasm',
  'microvascular-spasm',
  'endothelial-dysfunction',
  'equivocal',
  'negative',
] as const;
export type VasoreactivityOutcome = (typeof vasoreactivityOutcomes)[number];

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

export const endotypes = [
  'obstructive',
  'microvascular-angina',
  'vasospastic-angina',
  'mixed',
  'no-abnormality',
  'inconclusive',
] as const;
export type Endotype = (typeof endotypes)[number];

export interface Findings {
  /** Any vessel obstructive: judged by its pressure index, else by ≥ 50% visual stenosis (COVADIS). */
  obstructive: boolean;
  /**
   * The subtype of microvascular dysfunction in a non-obstructed vessel (the most severe over the
   * vessels): structural (low CFR and high IMR), functional (low CFR, IMR measured and not high),
   * raised-imr (high IMR with CFR measured and not low: normal or borderline). Null when no vessel has a
   * subtype — also when dysfunction was found but its type cannot be decided (low CFR with IMR not
   * measured, or high IMR with CFR not measured): `microvascularDysfunction` says that.
   */
  microvascular: null | 'structural' | 'functional' | 'raised-imr';
  /** Coronary microvascular dysfunction shown by CFR or IMR in a non-obstructed vessel, typed or not. */
  microvascularDysfunction: boolean;
  /** Acetylcholine constriction without spasm (the study's acetylcholine result). */
  endothelialDysfunction: boolean;
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
  /** One line for the result panel and the report: the endotype, or every coexisting finding. */
  headline: string;
  reasons: string[];
}
