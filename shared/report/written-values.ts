import type { PhysiologyResult, VesselResult } from '../physiology/types';
import { vesselName } from '../physiology/format';
import { formatQuantity, roundHalfAway, type QuantityKind } from '../physiology/precision';

/**
 * Numbers the physician typed into the impression or plan beside an index's name ("FFR 0.86"), checked
 * against what was measured, so a report never goes out saying one value while its table shows another
 * (a number copied from another case, or from before a correction). A caution for the signer, not a
 * refusal: the free text is theirs.
 *
 * Only names that mean one index are read (FFR, CFR, IMR, RRR, MRR), and only a number that follows
 * the name directly or after "of", "was", "is", "=" or ":" — "FFR ≤ 0.80" states a cut-off and is not
 * read. A written number matches when a vessel's value, rounded to as many decimals as were written,
 * equals it ("CFR 2.5" matches a measured 2.46).
 */

export type WrittenIndex = 'FFR' | 'CFR' | 'IMR' | 'RRR' | 'MRR';

export interface WrittenValueMismatch {
  field: 'impression' | 'plan';
  index: WrittenIndex;
  /** The words as written ("FFR of 0.86"). */
  written: string;
  /** Each vessel's value of that index as the report prints it ("LAD 0.78"); empty when none was measured. */
  measured: string[];
  /** One plain sentence for the signer. */
  message: string;
}

const indexValue: Record<WrittenIndex, { kind: QuantityKind; of: (v: VesselResult) => number | undefined }> = {
  FFR: { kind: 'ratio', of: (v) => v.ffr },
  CFR: { kind: 'ratio', of: (v) => v.cfr },
  IMR: { kind: 'imr', of: (v) => v.imr },
  RRR: { kind: 'ratio', of: (v) => v.rrr },
  MRR: { kind: 'ratio', of: (v) => v.mrr },
};

// The name, then only linking words, then the number (a decimal comma read as a point).
const mention = /\b(FFR|CFR|IMR|RRR|MRR)\b((?:\s*(?:of|was|is|were|=|:))*\s*)(\d+(?:[.,]\d+)?)(?![\d.,]*\d)/gi;

function decimalsOf(text: string): number {
  const sep = text.search(/[.,]/);
  return sep < 0 ? 0 : text.length - sep - 1;
}

/** Whether a measured value, rounded as the written number is, equals it. */
function agrees(measured: number, written: string): boolean {
  const d = decimalsOf(written);
  return roundHalfAway(measured, d) === Number(written.replace(',', '.'));
}

export function writtenValueMismatches(findings: { impression?: string | null; plan?: string | null }, analysis: Pick<PhysiologyResult, 'vessels'>): WrittenValueMismatch[] {
  const out: WrittenValueMismatch[] = [];
  for (const field of ['impression', 'plan'] as const) {
    const text = findings[field];
    if (!text) continue;
    for (const m of text.matchAll(mention)) {
      const index = m[1].toUpperCase() as WrittenIndex;
      const number = m[3];
      const { kind, of } = indexValue[index];
      const values = analysis.vessels.flatMap((v) => {
        const x = of(v);
        return x === undefined || !Number.isFinite(x) ? [] : [{ vessel: vesselName(v.vessel), value: x }];
      });
      if (values.some((x) => agrees(x.value, number))) continue;
      const measured = values.map((x) => `${x.vessel} ${formatQuantity(x.value, kind)}`);
      const where = field === 'impression' ? 'The impression' : 'The plan';
      out.push({
        field,
        index,
        written: m[0],
        measured,
        message: measured.length
          ? `${where} says “${m[0]}”, but the measured ${index} is ${measured.join(', ')}: check the text before signing.`
          : `${where} says “${m[0]}”, but no ${index} was measured in this study: check the text before signing.`,
      });
    }
  }
  return out;
}
