// jstat and ml-logistic-regression ship no type declarations; they are used only as
// cross-checks in tests and benchmarks, so a loose declaration is enough.
declare module "jstat" {
  const jStat: any;
  export default jStat;
}
declare module "ml-logistic-regression" {
  const LogisticRegression: any;
  export default LogisticRegression;
}
