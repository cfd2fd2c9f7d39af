import { z } from 'zod';
import { vesselCodes, type VesselCode } from '../physiology/schema';

/**
 * The coding engine's input: what was done in one catheterization session and what the signed
 * findings say. Every field of the public shape is required; the encounter fields may be `null`
 * ("not recorded yet"), which the engine answers with a blocking warning rather than a guess.
 */

export const billingContexts = ['professional', 'facility'] as const;
export const settings = ['hospital', 'office'] as const;
export const patientClasses = ['outpatient', 'inpatient'] as const;
export const interventionKinds = ['balloon', 'stent', 'atherectomy', 'atherectomy-stent'] as const;
export const stentTypes = ['drug-eluting', 'bare-metal'] as const;
export const measuredIndices = ['ffr', 'nhpr', 'cfr', 'imr'] as const;
export const provocationAgents = ['acetylcholine', 'ergonovine'] as const;
export const codeSystems = ['CPT', 'HCPCS', 'ICD-10-CM', 'ICD-10-PCS'] as const;

export type BillingContext = (typeof billingContexts)[number];
export type Setting = (typeof settings)[number];
export type PatientClass = (typeof patientClasses)[number];
export type InterventionKind = (typeof interventionKinds)[number];
export type StentType = (typeof stentTypes)[number];
export type MeasuredIndex = (typeof measuredIndices)[number];
export type CodeSystem = (typeof codeSystems)[number];

const choice = <T extends readonly [string, ...string[]]>(label: string, values: T) =>
  z.enum(values, { error: `${label}: one of ${values.join(', ')}.` });
const flag = (label: string) => z.boolean({ error: `${label} must be true or false.` });
const vessel = (label: string) => choice(label, vesselCodes);
const strictMessage = (where: string) => (iss: { code?: string; keys?: string[] }) =>
  iss.code === 'unrecognized_keys' ? `Unknown field(s) in ${where}: ${(iss.keys ?? []).join(', ')}.` : `${where} must be an object.`;

export const cathSchema = z.strictObject(
  {
    coronaryAngiography: flag('cath.coronaryAngiography'),
    leftHeart: flag('cath.leftHeart'),
    rightHeart: flag('cath.rightHeart'),
    graftAngiography: flag('cath.graftAngiography'),
    /** Left ventriculography done with the left heart catheterization (included in its code). */
    leftVentriculography: flag('cath.leftVentriculography').optional(),
  },
  { error: strictMessage('cath') },
);

export const pciSchema = z.strictObject(
  {
    vessel: vessel('pci.vessel'),
    kind: choice('pci.kind', interventionKinds),
    /** A branch of the named major vessel (a diagonal of the LAD, a marginal of the circumflex…). */
    branch: flag('pci.branch').optional(),
    /** The stent placed, when the kind includes a stent; facility outpatient claims may need it. */
    stent: choice('pci.stent', stentTypes).optional(),
  },
  { error: strictMessage('a pci entry') },
);

export const physiologyEntrySchema = z.strictObject(
  {
    vessel: vessel('physiology.vessel'),
    measured: z.array(choice('physiology.measured', measuredIndices), { error: 'physiology.measured must be a list.' }).max(4),
    /** A hyperaemic drug was given for this vessel. */
    hyperemicAgent: flag('physiology.hyperemicAgent'),
  },
  { error: strictMessage('a physiology entry') },
);

export const diagnosesSchema = z.strictObject(
  {
    obstructiveCad: flag('diagnoses.obstructiveCad'),
    angina: flag('diagnoses.angina'),
    microvascularDysfunction: flag('diagnoses.microvascularDysfunction'),
    vasospasm: choice('diagnoses.vasospasm', ['epicardial', 'microvascular'] as const).nullable(),
  },
  { error: strictMessage('diagnoses') },
);

const isoDate = z.iso.date({ error: 'dateOfService must be a date (YYYY-MM-DD).' });

const noteSchema = z.strictObject({ code: z.string().min(1).max(80), message: z.string().min(1).max(2000), blocking: z.boolean().optional() });

export const codingInputSchema = z.strictObject(
  {
    billing: choice('billing', billingContexts).nullable(),
    setting: choice('setting', settings).nullable(),
    patientClass: choice('patientClass', patientClasses).nullable(),
    cath: cathSchema.nullable(),
    pci: z.array(pciSchema, { error: 'pci must be a list.' }).max(20, { error: 'At most 20 interventions.' }),
    physiology: z.array(physiologyEntrySchema, { error: 'physiology must be a list.' }).max(12, { error: 'At most 12 vessels.' }),
    vasoreactivity: z
      .strictObject({ agent: choice('vasoreactivity.agent', provocationAgents), vessel: vessel('vasoreactivity.vessel') }, { error: strictMessage('vasoreactivity') })
      .nullable(),
    diagnoses: diagnosesSchema,
    /**
     * The date of service: it chooses the code-set year. Absent: the latest encoded year is used
     * (the result says so). `null`: the study has no procedure date yet, which is warned.
     */
    dateOfService: isoDate.nullable().optional(),
    /** Notes from the mapping of a study to this input (what it had to infer), passed to the coder. */
    notes: z.array(noteSchema).max(50).optional(),
  },
  { error: strictMessage('the coding input') },
);

export type CodingInput = z.input<typeof codingInputSchema>;
export type CodingData = z.output<typeof codingInputSchema>;
export type PciEntry = z.output<typeof pciSchema>;
export type PhysiologyEntry = z.output<typeof physiologyEntrySchema>;
export type { VesselCode };

export interface SuggestedCode {
  system: CodeSystem;
  code: string;
  units: number;
  modifiers: string[];
  /** Stable id of the rule that produced it. */
  ruleId: string;
  /** Why, in a sentence a coder can check. */
  rationale: string;
  /** What the code stands for, in our own words (not the code set's descriptor). */
  description: string;
  /** An add-on code: reported only with a primary procedure on the same claim. */
  addOn: boolean;
  /** The code-set release the suggestion was checked against, e.g. "CPT 2025", "ICD-10-CM FY2026". */
  codeSet: string;
  /** Where the rule comes from. */
  source: string;
  /** The caution every suggestion carries. */
  caution: string;
}

export interface CodingWarning {
  code: string;
  message: string;
  /** The rule that raised it, when one did. */
  ruleId?: string;
  /** The review cannot be completed until this is resolved in the study. */
  blocking?: boolean;
}

export interface CodeSetChoice {
  /** The release used, e.g. 2025 for CPT 2025 or 2026 for ICD-10-CM FY2026. */
  year: number;
  label: string;
  /** The date of service falls in a release this engine encodes. */
  encoded: boolean;
}

export interface CodingResult {
  codes: SuggestedCode[];
  warnings: CodingWarning[];
  /** Which code-set releases were applied, and how they were chosen. */
  codeSets: {
    basis: 'date-of-service' | 'latest-encoded';
    dateOfService: string | null;
    CPT: CodeSetChoice;
    HCPCS: CodeSetChoice;
    'ICD-10-CM': CodeSetChoice;
    'ICD-10-PCS': CodeSetChoice;
  };
  /** Shown with every suggestion. */
  caution: string;
}
