// Minimal typings for the parts of jstat 1.9 the domain tests use as a reference library.
declare module 'jstat' {
  export const jStat: {
    chisquare: { inv(p: number, df: number): number; cdf(x: number, df: number): number };
    normal: { inv(p: number, mean: number, sd: number): number; cdf(x: number, mean: number, sd: number): number };
    studentt: { inv(p: number, df: number): number };
    gammaln(x: number): number;
  };
}
