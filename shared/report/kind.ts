import type { StudySections } from '../study/schema';

/** A lesion report speaks of lesions, their ratios and the decision; a coronary function report of the endotype. */
export type ReportKind = 'lesion' | 'coronary-function';

/** The clinical questions about a lesion. */
const lesionQuestions: ReadonlySet<string> = new Set(['intermediate-lesion', 'post-pci']);

type KindSource = {
  details: Pick<StudySections['details'], 'clinicalQuestion'>;
  vessels: ReadonlyArray<{ restTransit: readonly unknown[]; hyperemiaTransit: readonly unknown[] }>;
  vasoreactivity: { doses: readonly unknown[] };
};

/**
 * The clinical question decides the kind of study, for the report and the live result alike: an
 * intermediate lesion or a result after intervention is a lesion study; angina without obstruction a
 * coronary function study. When the question is "other" or not recorded, the data decide: transit
 * times or acetylcholine doses make it a coronary function study.
 */
export function reportKindOf(study: KindSource): ReportKind {
  const question = study.details.clinicalQuestion;
  if (question && lesionQuestions.has(question)) return 'lesion';
  if (question === 'angina-no-obstruction') return 'coronary-function';
  const thermo = study.vessels.some((v) => v.restTransit.length > 0 || v.hyperemiaTransit.length > 0);
  return thermo || study.vasoreactivity.doses.length > 0 ? 'coronary-function' : 'lesion';
}
