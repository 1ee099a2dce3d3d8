/**
 * Public surface of the SPC domain library (pure maths, no I/O). See each module for formulas and
 * sources: constants (ASTM E2587 factors), shewhart (X̄-R, X̄-S, I-MR, p, np, c, u), ewma (Roberts
 * 1959), cusum (Page 1954), rules (Western Electric 1956, Nelson 1984), capability (NIST §6.1.6,
 * Bissell 1990, Chan–Cheng–Spiring 1988, Anderson–Darling), phase1 (iterative exclusion
 * suggestions) and evaluate (the `POST /api/v1/spc/evaluate` contract).
 */
export * from './constants.ts';
export * from './math.ts';
export * from './rules.ts';
export * from './shewhart.ts';
export * from './ewma.ts';
export * from './cusum.ts';
export * from './capability.ts';
export * from './phase1.ts';
export * from './evaluate.ts';
