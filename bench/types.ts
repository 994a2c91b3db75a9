/** One benchmark case as reported by bench/run.ts. */
export type BenchCase = {
  name: string;
  /** Median wall time of one run, ms. */
  wallMsMedian: number;
  /** Number of timed runs the median is taken over. */
  runs: number;
  extra?: Record<string, number | string>;
};
