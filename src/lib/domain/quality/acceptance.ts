/**
 * Pass/fail of a quality test against the lab's acceptance settings.
 *
 * - Cross-cut (dry) and boil + cross-cut: the ISO 2409 / ASTM D3359 class from the percent of
 *   the lattice removed ({@link crosscutClass}); pass when the ISO class ≤ the accepted class
 *   (default 0 / 5B only, common practice).
 * - Bayer abrasion: ratio = reference haze gain ÷ test haze gain (ASTM F735, {@link bayerRatio});
 *   pass when ≥ the accepted minimum.
 * - Thickness: pass when min ≤ thickness ≤ max (µm, inclusive).
 * - Cosmetic: pass when every defect type's count ≤ its accepted maximum.
 */
import type { Acceptance, DefectType } from '../../shared/quality.ts';
import { bayerRatio } from './abrasion.ts';
import { crosscutClass } from './crosscut.ts';

/** The measurement of one test, by kind. */
export type TestMeasurement =
  | { kind: 'crosscut'; percentRemoved: number }
  | { kind: 'boil'; percentRemoved: number; boilCycles: number }
  | { kind: 'abrasion'; referenceHazeGainPct: number; testHazeGainPct: number }
  | { kind: 'thickness'; thicknessUm: number }
  | { kind: 'cosmetic'; defects: readonly { type: DefectType; count: number }[] };

/** The judged test: what was computed, pass/fail and the plain-words reasons. */
export interface TestJudgement {
  computed: Record<string, number | string | boolean | null>;
  result: 'pass' | 'fail';
  reasons: string[];
  /** One line for lists, e.g. "ISO 2409 class 2 / ASTM D3359 3B (12 % removed)". */
  summary: string;
}

const fmt = (x: number, d = 1) => (Number.isInteger(x) ? String(x) : x.toFixed(d));

/** Judges one measurement against the acceptance settings (see the module comment). */
export function judgeTest(m: TestMeasurement, acc: Acceptance): TestJudgement {
  switch (m.kind) {
    case 'crosscut':
    case 'boil': {
      const c = crosscutClass({ percentRemoved: m.percentRemoved });
      const max = m.kind === 'boil' ? acc.boilMaxIso : acc.crosscutMaxIso;
      const pass = c.iso2409 <= max;
      const after = m.kind === 'boil' ? ` after ${m.boilCycles} boil cycle${m.boilCycles === 1 ? '' : 's'}` : '';
      const summary = `ISO 2409 class ${c.iso2409} / ASTM D3359 ${c.astmD3359} (${fmt(m.percentRemoved)} % removed${after})`;
      return {
        computed: { iso2409: c.iso2409, astmD3359: c.astmD3359, percentRemoved: m.percentRemoved },
        result: pass ? 'pass' : 'fail',
        reasons: [
          pass
            ? `Class ${c.iso2409} / ${c.astmD3359} is within the accepted class ${max} / ${5 - max}B${after}.`
            : `Class ${c.iso2409} / ${c.astmD3359} is worse than the accepted class ${max} / ${5 - max}B${after}.`,
        ],
        summary,
      };
    }
    case 'abrasion': {
      const r = bayerRatio(m);
      const pass = r.bayerRatio >= acc.minBayerRatio;
      return {
        computed: { bayerRatio: r.bayerRatio, premium: r.premium },
        result: pass ? 'pass' : 'fail',
        reasons: [
          `Bayer ratio ${r.bayerRatio.toFixed(2)} ${pass ? 'meets' : 'is below'} the accepted minimum ${fmt(acc.minBayerRatio, 2)}${r.premium ? ' (premium: ≥ 4)' : ''}.`,
        ],
        summary: `Bayer ratio ${r.bayerRatio.toFixed(2)}`,
      };
    }
    case 'thickness': {
      const { min, max } = acc.thicknessUm;
      const t = m.thicknessUm;
      const pass = t >= min && t <= max;
      return {
        computed: { thicknessUm: t },
        result: pass ? 'pass' : 'fail',
        reasons: [
          pass
            ? `${t.toFixed(2)} µm is within the accepted ${fmt(min, 2)}–${fmt(max, 2)} µm.`
            : `${t.toFixed(2)} µm is ${t < min ? 'below' : 'above'} the accepted ${fmt(min, 2)}–${fmt(max, 2)} µm.`,
        ],
        summary: `${t.toFixed(2)} µm`,
      };
    }
    case 'cosmetic': {
      const over = m.defects.filter((d) => d.count > (acc.cosmeticMaxPerType[d.type] ?? 0));
      const total = m.defects.reduce((s, d) => s + d.count, 0);
      const computed: TestJudgement['computed'] = { totalDefects: total };
      for (const d of m.defects) computed[d.type] = d.count;
      return {
        computed,
        result: over.length ? 'fail' : 'pass',
        reasons: over.length
          ? over.map((d) => `${d.count} × ${d.type} (accepted: ${acc.cosmeticMaxPerType[d.type] ?? 0}).`)
          : [total ? `${total} defect(s), all within the accepted counts.` : 'No defects found.'],
        summary: total ? `${total} defect(s)${over.length ? `: ${over.map((d) => d.type).join(', ')}` : ''}` : 'No defects',
      };
    }
  }
}
