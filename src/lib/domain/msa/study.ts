/**
 * One entry point for a measurement-system study (gauge R&R, bias or linearity): the calculators
 * and the stored studies both call it, so a study computes the same way wherever it is judged.
 */
import { gaugeBias, gaugeLinearity, type BiasResult, type LinearityResult } from './bias-linearity.ts';
import { gaugeRrAnova, gaugeRrAverageRange, gridFromReadings, type GaugeReading, type GaugeVerdict } from './gauge-rr.ts';

export type GaugeStudyData =
  | { kind: 'grr'; method: 'anova' | 'average-range'; tolerance?: number | undefined; readings: GaugeReading[] }
  | { kind: 'bias'; reference: number; readings: number[]; processVariation?: number | undefined }
  | { kind: 'linearity'; points: { reference: number; reading: number }[]; processVariation?: number | undefined };

/** The GRR result of either method (the ANOVA table, or the ranges of the average-and-range form). */
export type GaugeRrFull = ReturnType<typeof gaugeRrAnova> | ReturnType<typeof gaugeRrAverageRange>;

export type GaugeStudyOutcome =
  | { kind: 'grr'; verdict: GaugeVerdict; reasons: string[]; appraisers: string[]; partNumbers: number[]; grr: GaugeRrFull }
  | { kind: 'bias'; verdict: GaugeVerdict; reasons: string[]; bias: BiasResult }
  | { kind: 'linearity'; verdict: GaugeVerdict; reasons: string[]; linearity: LinearityResult };

/**
 * Compute a study and its verdict. GRR: the AIAG bands (see gauge-rr.ts). Bias: acceptable when
 * zero lies in the 95 % interval of the bias, otherwise unacceptable. Linearity: acceptable when
 * neither slope nor intercept differs from zero at 5 %, otherwise unacceptable (AIAG MSA 4th ed. III-B).
 */
export function evaluateGaugeStudy(d: GaugeStudyData): GaugeStudyOutcome {
  if (d.kind === 'grr') {
    const grid = gridFromReadings(d.readings);
    const opts = d.tolerance === undefined ? {} : { tolerance: d.tolerance };
    const grr = d.method === 'anova' ? gaugeRrAnova(grid.values, opts) : gaugeRrAverageRange(grid.values, opts);
    return { kind: 'grr', verdict: grr.verdict, reasons: grr.reasons, appraisers: grid.appraisers, partNumbers: grid.parts, grr };
  }
  if (d.kind === 'bias') {
    const bias = gaugeBias(
      d.readings,
      d.reference,
      d.processVariation === undefined ? {} : { processVariation: d.processVariation },
    );
    const reasons = [
      `bias ${bias.bias.toPrecision(3)}, 95 % interval ${bias.ci[0].toPrecision(3)} to ${bias.ci[1].toPrecision(3)}`,
      bias.acceptable
        ? 'zero lies in the interval: no significant bias'
        : 'zero lies outside the interval: the gauge reads with a significant bias',
    ];
    return { kind: 'bias', verdict: bias.acceptable ? 'acceptable' : 'unacceptable', reasons, bias };
  }
  const linearity = gaugeLinearity(d.points, d.processVariation === undefined ? {} : { processVariation: d.processVariation });
  const reasons = [
    `bias = ${linearity.intercept.toPrecision(4)} + ${linearity.slope.toPrecision(4)} × reference (R² ${linearity.rSquared.toFixed(3)})`,
    linearity.linearityAcceptable
      ? 'slope not significant: no linearity problem'
      : `slope significant (|t| ${Math.abs(linearity.tSlope).toFixed(2)} > ${linearity.tCritical.toFixed(3)}): the bias changes across the range`,
    linearity.biasAcceptable
      ? 'intercept not significant'
      : `intercept significant (|t| ${Math.abs(linearity.tIntercept).toFixed(2)} > ${linearity.tCritical.toFixed(3)})`,
  ];
  const ok = linearity.linearityAcceptable && linearity.biasAcceptable;
  return { kind: 'linearity', verdict: ok ? 'acceptable' : 'unacceptable', reasons, linearity };
}
