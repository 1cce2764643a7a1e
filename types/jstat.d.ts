// Minimal typings for the parts of jstat the engine uses (the package ships none).
declare module 'jstat' {
  interface StudentT {
    inv(p: number, dof: number): number;
    cdf(x: number, dof: number): number;
  }
  interface CentralF {
    inv(p: number, df1: number, df2: number): number;
    cdf(x: number, df1: number, df2: number): number;
  }
  interface Normal {
    inv(p: number, mean: number, sd: number): number;
    cdf(x: number, mean: number, sd: number): number;
  }
  const jStat: { studentt: StudentT; centralF: CentralF; normal: Normal };
  export default jStat;
  export { jStat };
}
