// Benchmark: analyse 100,000 synthetic vessels through analyzeStudy and print vessels per second.
// Run: node_modules/.bin/tsx scripts/bench-physiology.ts
import { analyzeStudy, physiologyInputSchema, type PhysiologyInput, type VesselCode } from '../shared/physiology';
import { analyzeValidated } from '../shared/physiology/study';
import { median } from './bench-timing';

const TOTAL = 100_000;
const PER_STUDY = 4;
const RUNS = 7;
const codes: VesselCode[] = ['LAD', 'LCX', 'RCA', 'DIAGONAL', 'OBTUSE_MARGINAL', 'RAMUS', 'PDA', 'LM'];

// Deterministic PRNG (mulberry32) so runs are comparable.
let seed = 0x1234abcd;
function rand(): number {
  seed = (seed + 0x6d2b79f5) | 0;
  let r = Math.imul(seed ^ (seed >>> 15), 1 | seed);
  r = (r + Math.imul(r ^ (r >>> 7), 61 | r)) ^ r;
  return ((r ^ (r >>> 14)) >>> 0) / 4294967296;
}
const between = (lo: number, hi: number) => lo + (hi - lo) * rand();
const round = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;

type VesselIn = PhysiologyInput['vessels'][number];

// Three injections around a base transit time with ±10% jitter; 1 in 20 sets has a stray injection.
function injections(base: number): number[] {
  const xs = [0, 1, 2].map(() => round(base * between(0.9, 1.1), 2));
  if (rand() < 0.05) xs[2] = round(base * 1.6, 2);
  return xs;
}

function vessel(i: number): VesselIn {
  const restPa = round(between(80, 120), 0);
  const hypPa = round(restPa * between(0.85, 1.0), 0);
  const v: VesselIn = {
    id: `v${i}`,
    vessel: codes[i % codes.length],
    rest: { pa: restPa, pd: round(restPa * between(0.88, 1.0), 0), tmn: injections(between(0.5, 1.3)) },
    hyperemia: { pa: hypPa, pd: round(hypPa * between(0.65, 0.98), 0), tmn: injections(between(0.15, 0.45)) },
    driftPdPa: round(between(0.975, 1.025), 2),
  };
  if (i % 5 === 0) v.nhpr = { kind: 'diastolic', value: round(between(0.8, 1.0), 2) };
  if (i % 7 === 0) v.wedgePressure = round(between(10, 40), 0);
  return v;
}

const allVessels: VesselIn[] = Array.from({ length: TOTAL }, (_, i) => vessel(i));
const oneCall: PhysiologyInput = { vessels: allVessels };
const studies: PhysiologyInput[] = [];
for (let i = 0; i < TOTAL; i += PER_STUDY) {
  studies.push({
    vessels: allVessels.slice(i, i + PER_STUDY),
    vasoreactivity: {
      doses: [
        { vessel: 'LAD', micrograms: 20, constrictionPct: round(between(0, 40), 0), symptoms: false, ischemicEcg: false },
        { vessel: 'LAD', micrograms: 100, constrictionPct: round(between(0, 95), 0), symptoms: rand() < 0.3, ischemicEcg: rand() < 0.3 },
      ],
    },
  });
}

let sink = 0;
function time(fn: () => void): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}
function measure(label: string, fn: () => void): number {
  fn(); // warm-up
  fn();
  const ms: number[] = [];
  for (let r = 0; r < RUNS; r++) ms.push(time(fn));
  const mid = median(ms);
  const rate = TOTAL / (mid / 1000);
  console.log(
    `${label.padEnd(46)} median ${mid.toFixed(1).padStart(7)} ms  best ${Math.min(...ms).toFixed(1).padStart(7)} ms  → ${Math.round(rate).toLocaleString('en-US').padStart(10)} vessels/s`,
  );
  return rate;
}

console.log(`Analysing ${TOTAL.toLocaleString('en-US')} synthetic vessels (${RUNS} timed runs each, median reported)`);
const rateStudies = measure(`analyzeStudy, ${studies.length.toLocaleString('en-US')} studies of ${PER_STUDY} vessels + 2 doses`, () => {
  for (let i = 0; i < studies.length; i++) sink += analyzeStudy(studies[i]).reasons.length;
});
const rateOne = measure('analyzeStudy, one call of 100,000 vessels', () => {
  sink += analyzeStudy(oneCall).vessels.length;
});
console.log('For comparison (same studies):');
measure('  zod parse, then the same analysis', () => {
  for (let i = 0; i < studies.length; i++) sink += analyzeValidated(physiologyInputSchema.parse(studies[i])).reasons.length;
});
measure('  zod parse alone', () => {
  for (let i = 0; i < studies.length; i++) sink += physiologyInputSchema.parse(studies[i]).vessels.length;
});

const target = 200_000;
console.log(
  `Result: ${Math.round(rateStudies).toLocaleString('en-US')} vessels/s in studies of ${PER_STUDY} vessels ` +
    `(one call of 100,000: ${Math.round(rateOne).toLocaleString('en-US')} vessels/s, bound by garbage collection of the retained result); ` +
    `target > ${target.toLocaleString('en-US')} — ${rateStudies > target ? 'PASS' : 'FAIL'}`,
);
if (sink === -1) console.log(sink);
if (rateStudies <= target) process.exitCode = 1;
