/** One benchmark case as reported by bench/run.ts. */
export type BenchCase = {
  name: string;
  /** Median wall time of one run, ms. */
  wallMsMedian: number;
  /** Number of timed runs the median is taken over. */
  runs: number;
  /** Accepted integration steps (simulation cases). */
  steps?: number;
  /** Largest relative error against the reference over components above atol. */
  maxRelError?: number;
  /** The same problem and tolerances through RODAS4 (network cases: the yardstick of the automatic choice). */
  rodas4Ms?: number;
  rodas4Error?: number;
  /** Median ms of the fastest scipy method on the same problem, when measured. */
  scipyFastestMs?: number;
  scipyFastestMethod?: string;
  /** scipyFastestMs / wallMsMedian */
  speedup?: number;
  extra?: Record<string, number | string>;
};

/**
 * A group of benchmark cases. bench/run.ts loads every bench/*-cases.ts module that exports
 * `suite`, and runs the suites named on the command line (all when none is named).
 */
export interface BenchSuite {
  /** Short name used on the command line, e.g. "engine". */
  name: string;
  run(): Promise<BenchCase[]>;
}
