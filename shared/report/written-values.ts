import type { PhysiologyResult, VesselResult } from '../physiology/types';
import { vesselCodes, type VesselCode } from '../physiology/schema';
import { vesselLongName, vesselShortName } from '../physiology/vessels';
import { vesselName } from '../physiology/format';
import { displayDecimals, formatQuantity, roundForDisplay, roundHalfAway, type QuantityKind } from '../physiology/precision';

/**
 * Numbers the physician typed into the impression or plan beside an index's name ("FFR 0.86", "FFR was
 * 0.78 in the LAD and 0.91 in the RCA"), checked against what was measured, so a report never goes out
 * saying one value while its table shows another — a number copied from another case, from before a
 * correction, or given to the wrong vessel. A caution for the signer, never a refusal: the text is theirs.
 *
 * Read: FFR, CFR, IMR, RRR and MRR (names that mean one index), each number that follows the name
 * directly or after linking words ("of", "was", "=", ":", "(", "~", a vessel), and the numbers of a list
 * ("0.78 and 0.91", "0.78/0.91") or a range ("25–30"). A vessel named beside a number (after it, between
 * the index and it, or before the index in the same sentence) limits the comparison to that vessel.
 * Not read: cut-offs ("FFR ≤ 0.80", "CFR 2.0 cut-off"), values of another time or state ("previous",
 * "post-PCI", "after stenting", "target", a year in brackets, the number after an arrow).
 * A number agrees when it equals the value as the report prints it (ratios 2 decimals, IMR whole —
 * "FFR 0.8" for 0.80, never for 0.84), or, written with more decimals than printed, the value rounded to
 * them. "Uncorrected IMR" is compared with the uncorrected value.
 */

export type WrittenIndex = 'FFR' | 'CFR' | 'IMR' | 'RRR' | 'MRR';

export interface WrittenValueMismatch {
  field: 'impression' | 'plan';
  index: WrittenIndex;
  /** The words as written ("FFR was 0.91 in the LAD"), spaces collapsed. */
  written: string;
  /** The vessel the text gave the number to, when it named one ("LAD"). */
  vessel: string | null;
  /** The values of that index as the report prints them ("LAD 0.78"); empty when none was measured. */
  measured: string[];
  /** One plain sentence for the signer. */
  message: string;
}

const indexKind: Record<WrittenIndex, QuantityKind> = { FFR: 'ratio', CFR: 'ratio', IMR: 'imr', RRR: 'ratio', MRR: 'ratio' };
const indexValue: Record<WrittenIndex, (v: VesselResult) => number | undefined> = {
  FFR: (v) => v.ffr,
  CFR: (v) => v.cfr,
  IMR: (v) => v.imr,
  RRR: (v) => v.rrr,
  MRR: (v) => v.mrr,
};

/**
 * How a text names each vessel: the names the report itself prints (`vesselShortName`,
 * `vesselLongName`) and the abbreviations and shorter words of the trade beside them (common practice).
 */
const moreVesselWords: Readonly<Record<VesselCode, readonly string[]>> = {
  LM: ['LMCA'],
  LAD: [],
  LCX: ['Cx'],
  RCA: ['right coronary artery'],
  RAMUS: ['RI'],
  DIAGONAL: ['D1', 'D2', 'D3'],
  OBTUSE_MARGINAL: ['OM1', 'OM2', 'OM3', 'obtuse marginal'],
  PDA: [],
  PLB: ['PLV', 'posterolateral'],
  GRAFT: ['SVG', 'LIMA', 'RIMA'],
};
const escapeRegExp = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
/** Each vessel's words as one alternation, longest first (so "Diagonal branch" is quoted whole). */
const vesselWords = vesselCodes.map((code) => {
  const words = [vesselShortName[code], vesselLongName[code], ...moreVesselWords[code]].sort((x, y) => y.length - x.length);
  const alternation = words.map(escapeRegExp).join('|');
  return { code, alternation, exactly: new RegExp(`^(?:${alternation})$`, 'i') };
});
const VESSEL = vesselWords.map((w) => `(?:${w.alternation})`).join('|');
const vesselOf = (word: string): VesselCode | null => vesselWords.find((w) => w.exactly.test(word.trim()))?.code ?? null;

const NUMBER = String.raw`(?:\d+(?:[.,]\d+)?|[.,]\d+)`;
const indexName = /\b(FFR|CFR|IMR|RRR|MRR)s?\b/gi;
/** Words between the index's name and its number that keep them together; a vessel among them is kept. */
const linking = new RegExp(String.raw`^(?:\s*(?:(?:of|was|were|is|are|measured|at|values?|about|around|approximately|approx\.?)(?=\W)|=|:|\(|~|≈)|\s*(?:in\s+(?:the\s+)?)?(${VESSEL})\b\s*:?)`, 'i');
const numberAt = new RegExp(String.raw`^\s*(${NUMBER})(?:\s*(?:-|–|to)\s*(${NUMBER}))?(?![\d.,]*\d)`);
/** After a number: a unit, then a vessel ("in the LAD", "(LAD)", "LAD"). */
const afterNumber = new RegExp(String.raw`^(?:\s*(?:U|units?)\b)?\s*\)?\s*(?:(?:in|for)\s+(?:the\s+)?(${VESSEL})\b|\((${VESSEL})\)|(${VESSEL})\b)?`, 'i');
/** After a number, words that make it a cut-off or a value of another time. */
const otherValueAfter = /^\s*(?:\(\s*(?:19|20)\d\d\s*\)|(?:in|on|from)\s+(?:19|20)\d\d\b|(?:after|post|following|before|previously|at follow-up|cut-?off|threshold|target)\b)/i;
/** Before an index's name in its sentence, words that make its numbers values of another time or cut-offs. */
const otherValueBefore = /\b(?:previous(?:ly)?|prior|baseline|earlier|post[- ]?(?:PCI|stent\w*|dilat\w*|procedure)|after\s+(?:PCI|stent\w*)|final|target|expected|cut-?off|threshold)\W+(?:[\w/-]+\W+){0,2}$/i;
const uncorrectedBefore = /\b(?:uncorrected|apparent|raw)\W+$/i;
const uncorrectedAfter = /^\s*(?:U\b\s*)?\(?\s*(?:uncorrected|apparent|raw)\b/i;
const listJoin = /^\s*(?:,|\/|and|&)\s*/i;

interface WrittenNumber {
  index: WrittenIndex;
  quote: string;
  low: number;
  high: number;
  /** Decimals as written (of the single number; a range is compared at display precision). */
  decimals: number;
  vessel: VesselCode | null;
  uncorrected: boolean;
}

const decimalsOf = (text: string) => {
  const sep = text.search(/[.,]/);
  return sep < 0 ? 0 : text.length - sep - 1;
};
const toNumber = (text: string) => Number(text.replace(',', '.').replace(/^\./, '0.'));
const collapse = (s: string) => s.replace(/\s+/g, ' ').trim();
const closeBracket = (s: string) => ((s.match(/\(/g) ?? []).length > (s.match(/\)/g) ?? []).length ? `${s})` : s);

/** The sentences of a free text (a decimal point is not a sentence's end; a blank line is). */
const sentencesOf = (text: string) => text.split(/(?<=[.;!?])\s+|\n\s*\n/);

/** Every number written for an index in one sentence, with the vessel it was given to. */
function numbersIn(sentence: string): WrittenNumber[] {
  const out: WrittenNumber[] = [];
  let lastEnd = 0;
  for (const m of sentence.matchAll(indexName)) {
    const index = m[1].toUpperCase() as WrittenIndex;
    const start = m.index!;
    const before = sentence.slice(lastEnd, start);
    let at = start + m[0].length;
    lastEnd = at;
    if (otherValueBefore.test(sentence.slice(0, start))) continue;
    const vesselsBefore = [...before.matchAll(new RegExp(`\\b(${VESSEL})\\b`, 'gi'))];
    const vesselBefore = vesselsBefore.length ? vesselOf(vesselsBefore[vesselsBefore.length - 1][1]) : null;
    const uncorrectedName = index === 'IMR' && uncorrectedBefore.test(sentence.slice(0, start));
    let vesselBetween: VesselCode | null = null;
    for (let link = linking.exec(sentence.slice(at)); link && link[0].length > 0; link = linking.exec(sentence.slice(at))) {
      if (link[1]) vesselBetween = vesselOf(link[1]);
      at += link[0].length;
    }
    let first = true;
    for (;;) {
      const n = numberAt.exec(sentence.slice(at));
      if (!n) break;
      const numberEnd = at + n[0].length;
      const tail = afterNumber.exec(sentence.slice(numberEnd))!;
      const vesselAfter = tail[1] ?? tail[2] ?? tail[3];
      const end = numberEnd + (vesselAfter ? tail[0].length : 0);
      const rest = sentence.slice(numberEnd);
      const other = otherValueAfter.test(rest.replace(/^\s*(?:U|units?)\b/i, ''));
      const low = toNumber(n[1]);
      const high = n[2] ? toNumber(n[2]) : low;
      if (!other && Number.isFinite(low) && Number.isFinite(high)) {
        out.push({
          index,
          quote: closeBracket(collapse(first ? sentence.slice(start, end) : `${m[0]} … ${sentence.slice(at, end)}`)),
          low: Math.min(low, high),
          high: Math.max(low, high),
          decimals: n[2] ? -1 : decimalsOf(n[1]),
          vessel: (vesselAfter ? vesselOf(vesselAfter) : null) ?? vesselBetween ?? vesselBefore,
          uncorrected: uncorrectedName || (index === 'IMR' && uncorrectedAfter.test(rest)),
        });
      }
      // A number after an arrow is a value of another state ("0.75 → 0.88 after stenting"): the list ends.
      if (/^\s*(?:→|->)/.test(rest)) break;
      at = vesselAfter ? end : numberEnd;
      lastEnd = at;
      const join = listJoin.exec(sentence.slice(at));
      if (!join || !numberAt.test(sentence.slice(at + join[0].length))) break;
      at += join[0].length;
      first = false;
    }
  }
  return out;
}

/** Whether a measured value agrees with a written number (see the module's comment). */
function agrees(value: number, w: WrittenNumber, kind: QuantityKind): boolean {
  const printed = roundForDisplay(value, kind);
  if (w.decimals < 0) return printed >= w.low && printed <= w.high;
  if (printed === w.low) return true;
  return w.decimals > displayDecimals[kind] && roundHalfAway(value, w.decimals) === w.low;
}

export function writtenValueMismatches(findings: { impression?: string | null; plan?: string | null }, analysis: Pick<PhysiologyResult, 'vessels'>): WrittenValueMismatch[] {
  const out: WrittenValueMismatch[] = [];
  for (const field of ['impression', 'plan'] as const) {
    const text = findings[field];
    if (!text) continue;
    const where = field === 'impression' ? 'The impression' : 'The plan';
    for (const w of sentencesOf(text).flatMap(numbersIn)) {
      const kind = indexKind[w.index];
      const valueOf = w.uncorrected ? (v: VesselResult) => v.imrUncorrected ?? v.imr : indexValue[w.index];
      const values = analysis.vessels.flatMap((v) => {
        const x = valueOf(v);
        return x === undefined || !Number.isFinite(x) ? [] : [{ vessel: v.vessel, value: x, uncorrected: v.imrUncorrected }];
      });
      const named = w.vessel ? values.filter((x) => x.vessel === w.vessel) : values;
      if (named.some((x) => agrees(x.value, w, kind))) continue;
      const shown = (xs: typeof values) => xs.map((x) => `${vesselName(x.vessel)} ${formatQuantity(x.value, kind)}`);
      const vessel = w.vessel ? vesselName(w.vessel) : null;
      const label = w.uncorrected ? 'uncorrected IMR' : w.index;
      let message: string;
      const uncorrectedMatch = w.index === 'IMR' && !w.uncorrected && named.find((x) => x.uncorrected !== undefined && agrees(x.uncorrected, w, kind));
      if (uncorrectedMatch) {
        message = `${where} says “${w.quote}”: that is the uncorrected IMR; the report’s IMR is ${shown(named).join(', ')}. Check the text before signing.`;
      } else if (named.length) {
        message = `${where} says “${w.quote}”, but this study measured ${label} ${shown(named).join(', ')}. Check the text before signing.`;
      } else if (vessel && values.length) {
        message = `${where} says “${w.quote}”, but this study measured no ${label} in the ${vessel} (${label} ${shown(values).join(', ')}). Check the text before signing.`;
      } else {
        message = `${where} says “${w.quote}”, but this study measured no ${label}. Check the text before signing.`;
      }
      out.push({ field, index: w.index, written: w.quote, vessel, measured: shown(named.length ? named : values), message });
    }
  }
  return out;
}
