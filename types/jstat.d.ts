// Minimal typings for the parts of jstat (npm) the tests use as a reference library.
declare module "jstat" {
  interface Continuous2 {
    pdf(x: number, a: number, b: number): number;
    cdf(x: number, a: number, b: number): number;
    inv(p: number, a: number, b: number): number;
    mean(a: number, b: number): number;
    variance(a: number, b: number): number;
  }
  interface Continuous1 {
    pdf(x: number, a: number): number;
    cdf(x: number, a: number): number;
    inv(p: number, a: number): number;
  }
  interface Discrete2 {
    pdf(k: number, a: number, b: number): number;
    cdf(k: number, a: number, b: number): number;
  }
  interface Discrete1 {
    pdf(k: number, a: number): number;
    cdf(k: number, a: number): number;
  }
  const jStat: {
    normal: Continuous2;
    gamma: Continuous2;
    beta: Continuous2;
    cauchy: Continuous2;
    lognormal: Continuous2;
    laplace: Continuous2;
    uniform: Continuous2;
    weibull: Continuous2;
    pareto: Continuous2;
    exponential: Continuous1;
    chisquare: Continuous1;
    studentt: Continuous1;
    binomial: Discrete2;
    negbin: Discrete2;
    poisson: Discrete1;
    gammafn(x: number): number;
    gammaln(x: number): number;
    erf(x: number): number;
    erfc(x: number): number;
  };
  export default jStat;
}
