// Only the parts of jstat 1.9 that Lumenbook uses; the package ships no types.
declare module 'jstat' {
  interface JStatStatic {
    /** Regularized incomplete beta function I_x(a, b). */
    ibeta(x: number, a: number, b: number): number;
    studentt: {
      cdf(x: number, dof: number): number;
      inv(p: number, dof: number): number;
    };
    mean(values: readonly number[]): number;
    median(values: readonly number[]): number;
    /** flag = true gives the sample (n − 1) standard deviation. */
    stdev(values: readonly number[], flag?: boolean): number;
  }
  const jStat: JStatStatic;
  export default jStat;
}
