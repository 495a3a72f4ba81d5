/** The part of the untyped `jstat` package (1.9.6) that Trialbook uses: the studentized range. */
declare module "jstat" {
  const jStat: {
    readonly tukey: {
      cdf(q: number, nmeans: number, df: number): number;
      inv(p: number, nmeans: number, df: number): number;
    };
  };
  export default jStat;
}
