// The few jstat functions Stagewright's Risk layer uses (jstat ships no types).
declare module "jstat" {
  interface JStat {
    /** Inverse of the regularised incomplete beta function I_x(a, b). */
    ibetainv(p: number, a: number, b: number): number;
    /** Inverse of the regularised lower incomplete gamma function P(a, x). */
    gammapinv(p: number, a: number): number;
    /** Regularised incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    /** Regularised lower incomplete gamma function P(a, x). */
    lowRegGamma(a: number, x: number): number;
    /** log Γ(x). */
    gammaln(x: number): number;
  }
  const jStat: JStat;
  export default jStat;
}
