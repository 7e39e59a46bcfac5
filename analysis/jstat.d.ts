// jstat ships no types; declare only what Tilthmark uses. It is CommonJS: import the default.
declare module "jstat" {
  interface Distribution {
    cdf(x: number, ...params: number[]): number;
    inv(p: number, ...params: number[]): number;
    pdf(x: number, ...params: number[]): number;
  }
  interface JStat {
    studentt: Distribution;
    centralF: Distribution;
    normal: Distribution;
    chisquare: Distribution;
    tukey: { cdf(q: number, nmeans: number, df: number): number; inv(p: number, nmeans: number, df: number): number };
    /** Regularized incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
  }
  const jStat: JStat;
  export default jStat;
}
