/**
 * `npm run bench:spc`: evaluates 10,000 subgroups of 5 on an X̄-R chart with all eight Nelson
 * tests (the library's evaluateSpc: statistics, limits, Phase I suggestions, rules) and prints
 * the time next to a plain loop that computes only the subgroup means of the same data, as a
 * ratio. Also: the same data judged point by point as the ingest worker does (Phase II, one new
 * subgroup at a time with its rule history). Figures only; nothing is asserted.
 */
import { performance } from 'node:perf_hooks';
import { judgeSubgroups } from '../../src/lib/domain/control/phase2.ts';
import { evaluateSpc, limitSetFromEvaluation } from '../../src/lib/domain/spc/evaluate.ts';
import { SpcEvaluateInputSchema, type SpcRuleId } from '../../src/lib/shared/spc.ts';

const SUBGROUPS = 10_000;
const N = 5;
const NELSON: SpcRuleId[] = ['nelson1', 'nelson2', 'nelson3', 'nelson4', 'nelson5', 'nelson6', 'nelson7', 'nelson8'];

// Deterministic normal data (mulberry32 + Box–Muller) with a small shift two-thirds of the way.
let seed = 0x5eed;
const rand = () => {
  seed |= 0;
  seed = (seed + 0x6d2b79f5) | 0;
  let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
  t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
};
const gauss = () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
const subgroups: number[][] = Array.from({ length: SUBGROUPS }, (_, i) =>
  Array.from({ length: N }, () => 2 + 0.02 * gauss() + (i > (2 * SUBGROUPS) / 3 ? 0.01 : 0)),
);

function time<T>(runs: number, f: () => T): { ms: number; out: T } {
  let out = f(); // warm-up
  const samples: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    out = f();
    samples.push(performance.now() - t0);
  }
  samples.sort((a, b) => a - b);
  return { ms: samples[Math.floor(samples.length / 2)]!, out };
}

const input = SpcEvaluateInputSchema.parse({ chart: 'xbar-r', subgroups, rules: NELSON });
const validate = time(5, () => SpcEvaluateInputSchema.parse({ chart: 'xbar-r', subgroups, rules: NELSON }));
const full = time(7, () => evaluateSpc(input));
const means = time(21, () => {
  const out = new Float64Array(SUBGROUPS);
  for (let i = 0; i < SUBGROUPS; i++) {
    const sg = subgroups[i]!;
    let s = 0;
    for (let j = 0; j < N; j++) s += sg[j]!;
    out[i] = s / N;
  }
  return out;
});
const signals = full.out.points.filter((p) => p.violations.length > 0).length;

// Phase II as the worker does it: each new subgroup judged with the last 14 as rule history.
const limits = limitSetFromEvaluation(
  evaluateSpc(SpcEvaluateInputSchema.parse({ chart: 'xbar-r', subgroups: subgroups.slice(0, 100) })),
);
const live = time(3, () => {
  let fired = 0;
  for (let i = 0; i < SUBGROUPS; i++)
    fired +=
      judgeSubgroups(limits, NELSON, subgroups.slice(Math.max(0, i - 14), i), [subgroups[i]!])[0]!.violations.length > 0 ? 1 : 0;
  return fired;
});

const f = (ms: number) => `${ms.toFixed(2)} ms`;
console.log(
  `SPC benchmark — ${SUBGROUPS.toLocaleString('en')} subgroups of ${N}, X̄-R, Nelson tests 1–8 (median of runs, Node ${process.version})`,
);
console.log(
  `  evaluateSpc (statistics, limits, Phase I suggestions, 8 rules): ${f(full.ms)}  (${signals} points signal; ${full.out.phase1?.suggestedExclusions.length ?? 0} suggested exclusions)`,
);
console.log(`  plain loop, subgroup means only:                               ${f(means.ms)}`);
console.log(`  ratio evaluateSpc / means loop:                                ${(full.ms / means.ms).toFixed(0)} ×`);
console.log(
  `  per subgroup: ${((full.ms * 1000) / SUBGROUPS).toFixed(2)} µs evaluated vs ${((means.ms * 1000) / SUBGROUPS).toFixed(3)} µs mean only`,
);
console.log(`  schema validation of the same request (zod):                    ${f(validate.ms)}`);
console.log(
  `  Phase II one subgroup at a time (worker path, 14-point history): ${f(live.ms)} for all ${SUBGROUPS.toLocaleString('en')} = ${((live.ms * 1000) / SUBGROUPS).toFixed(1)} µs per subgroup (${live.out} signal)`,
);
