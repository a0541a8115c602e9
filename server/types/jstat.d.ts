/**
 * Minimal types for the parts of jstat 1.9.6 the analysis engine uses. The package ships no
 * types; its CommonJS default export carries the library under `.jStat`.
 */
declare module 'jstat' {
  interface JStatDistribution {
    pdf(x: number, ...params: number[]): number;
    cdf(x: number, ...params: number[]): number;
    inv(p: number, ...params: number[]): number;
  }
  interface JStatStatic {
    normal: JStatDistribution;
    studentt: JStatDistribution;
    chisquare: JStatDistribution;
    mean(values: number[]): number;
    median(values: number[]): number;
    variance(values: number[], sample?: boolean): number;
  }
  const jstatModule: { jStat: JStatStatic };
  export default jstatModule;
}
