import { z } from 'zod';
import { thresholdsSchema } from './thresholds';
import { drugRoutes, hyperemicAgents } from './drugs';

export const vesselCodes = [
  'LM',
  'LAD',
  'LCX',
  'RCA',
  'RAMUS',
  'DIAGONAL',
  'OBTUSE_MARGINAL',
  'PDA',
  'PLB',
  'GRAFT',
] as const;

export type VesselCode = (typeof vesselCodes)[number];

export const nhprKinds = ['whole-cycle', 'diastolic', 'full-cycle-minimum'] as const;
export type NhprKind = (typeof nhprKinds)[number];

/**
 * Smallest accepted value of a quantity that must be positive (pressure in mmHg, time in s, ratio,
 * dose in µg): zero and negatives are impossible, and values this small are not measurable — the
 * floor also keeps every computed index finite.
 */
export const MIN_POSITIVE = 0.001;

/** A finite number in [min, max], with plain-English messages naming the field and the unit. */
function bounded(label: string, unit: string, kind: 'positive' | 'non-negative', max: number) {
  const u = unit === '' ? ' (a ratio)' : ` ${unit}`;
  const base = z.number({ error: `${label} must be a finite number${unit === '' ? ' (a ratio)' : ` in ${unit}`}.` });
  const low =
    kind === 'positive'
      ? base.gte(MIN_POSITIVE, { error: `${label} must be greater than 0${u} (at least ${MIN_POSITIVE}).` })
      : base.gte(0, { error: `${label} must be 0${u} or more.` });
  return low.lte(max, { error: `${label} must be at most ${max}${u}; higher values are not possible.` });
}

function strictMessage(where: string) {
  return (iss: { code?: string; keys?: string[] }) =>
    iss.code === 'unrecognized_keys'
      ? `Unknown field(s) in ${where}: ${(iss.keys ?? []).join(', ')}.`
      : `${where} must be an object.`;
}

/** Hard limits: beyond them a value is impossible and rejected. */
export const MAX_PRESSURE = 300; // mmHg
export const MAX_TRANSIT = 10; // s
export const MAX_RATIO = 1.5; // Pd/Pa, FFR, resting ratios, drift
export const MAX_MICROGRAMS = 1000; // acetylcholine bolus

/**
 * Mean pressures and transit times in one state. Pa and Pd go together (a ratio needs both); transit
 * times stand on their own, since CFR needs only the transit times of both states.
 */
function pressureSet(phase: 'Resting' | 'Hyperaemic') {
  return z
    .strictObject(
      {
        pa: bounded(`${phase} aortic pressure (Pa)`, 'mmHg', 'positive', MAX_PRESSURE).optional(),
        pd: bounded(`${phase} distal coronary pressure (Pd)`, 'mmHg', 'positive', MAX_PRESSURE).optional(),
        tmn: z
          .array(bounded(`${phase} transit time (Tmn)`, 's', 'positive', MAX_TRANSIT), {
            error: `${phase} transit times (Tmn) must be a list of numbers in seconds.`,
          })
          .optional(),
      },
      { error: strictMessage(`${phase.toLowerCase()} measurements`) },
    )
    .superRefine((set, ctx) => {
      if ((set.pa === undefined) !== (set.pd === undefined)) {
        const missing = set.pa === undefined ? 'pa' : 'pd';
        ctx.addIssue({
          code: 'custom',
          path: [missing],
          message: `${phase} ${missing === 'pa' ? 'Pa' : 'Pd'} is missing: Pa and Pd are entered together.`,
          input: set,
        });
      }
    });
}

export { hyperemicAgents, drugRoutes };

/**
 * Facts of the procedure that some quality checks need and the measurements do not carry: the
 * hyperaemic agent and route (no fall in aortic pressure on intravenous adenosine suggests inadequate
 * hyperaemia) and whether nitrates were given before acetylcholine (which can make it falsely negative).
 */
const procedureSchema = z.strictObject(
  {
    hyperemicAgent: z.enum(hyperemicAgents, { error: `Hyperaemic agent must be one of ${hyperemicAgents.join(', ')}.` }).optional(),
    hyperemicRoute: z.enum(drugRoutes, { error: `Hyperaemic route must be one of ${drugRoutes.join(', ')}.` }).optional(),
    /** 'unknown': nitrates were given, but whether before or after acetylcholine is not recorded. */
    nitratesBeforeAcetylcholine: z
      .union([z.boolean(), z.literal('unknown')], { error: "Nitrates before acetylcholine must be true, false or 'unknown'." })
      .optional(),
  },
  { error: strictMessage('the procedure') },
);

const nhprSchema = z.strictObject(
  {
    kind: z.enum(nhprKinds, {
      error: `Resting ratio kind must be one of ${nhprKinds.join(', ')}.`,
    }),
    value: bounded('Resting ratio value', '', 'positive', MAX_RATIO),
  },
  { error: strictMessage('the resting ratio') },
);

const vesselCodeSchema = z.enum(vesselCodes, {
  error: `Vessel must be one of ${vesselCodes.join(', ')}.`,
});

export const vesselInputSchema = z.strictObject(
  {
    id: z
      .string({ error: 'Vessel id must be a text key.' })
      .min(1, { error: 'Vessel id must not be empty.' }),
    vessel: vesselCodeSchema,
    rest: pressureSet('Resting').optional(),
    hyperemia: pressureSet('Hyperaemic').optional(),
    ffr: bounded('FFR', '', 'positive', MAX_RATIO).optional(),
    nhpr: nhprSchema.optional(),
    wedgePressure: bounded('Coronary wedge pressure (Pw)', 'mmHg', 'positive', MAX_PRESSURE).optional(),
    driftPdPa: bounded('Drift Pd/Pa at the guide tip', '', 'positive', MAX_RATIO).optional(),
    visualStenosisPct: bounded('Visual stenosis', '%', 'non-negative', 100).optional(),
  },
  { error: strictMessage('a vessel') },
);

export const doseSchema = z.strictObject(
  {
    vessel: vesselCodeSchema,
    micrograms: bounded('Acetylcholine dose', 'µg', 'positive', MAX_MICROGRAMS),
    constrictionPct: bounded('Constriction', '%', 'non-negative', 100),
    symptoms: z.boolean({ error: 'Symptoms reproduced must be true or false.' }),
    ischemicEcg: z.boolean({ error: 'Ischaemic ECG changes must be true or false.' }),
  },
  { error: strictMessage('an acetylcholine dose') },
);

export const physiologyInputSchema = z
  .strictObject(
    {
      vessels: z.array(vesselInputSchema, { error: 'Vessels must be a list.' }),
      vasoreactivity: z
        .strictObject(
          { doses: z.array(doseSchema, { error: 'Acetylcholine doses must be a list.' }) },
          { error: strictMessage('vasoreactivity') },
        )
        .optional(),
      thresholds: thresholdsSchema.optional(),
      procedure: procedureSchema.optional(),
      /**
       * Whether the patient has angina (or an anginal equivalent), as the record says: true, false, or
       * absent when not recorded. The COVADIS criteria for microvascular and vasospastic angina need the
       * symptom; without it the findings are named as dysfunction and spasm, not angina.
       */
      angina: z.boolean({ error: 'Angina must be true or false.' }).optional(),
    },
    { error: strictMessage('the physiology input') },
  )
  .superRefine((input, ctx) => {
    const vessels = input.vessels;
    if (vessels.length < 2) return;
    const seen = new Set<string>();
    for (let i = 0; i < vessels.length; i++) {
      const id = vessels[i].id;
      if (seen.has(id)) {
        ctx.addIssue({
          code: 'custom',
          path: ['vessels', i, 'id'],
          message: `Vessel id "${id}" is used more than once; each vessel needs its own id.`,
          input: id,
        });
      } else seen.add(id);
    }
  });

export type PhysiologyInput = z.input<typeof physiologyInputSchema>;
export type PhysiologyOutput = z.output<typeof physiologyInputSchema>;
export type VesselInput = z.output<typeof vesselInputSchema>;
export type DoseInput = z.output<typeof doseSchema>;
export type ProcedureInput = z.output<typeof procedureSchema>;
