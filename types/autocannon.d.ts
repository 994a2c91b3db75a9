/** The part of autocannon's API the load benchmark uses (the package ships no types). */
declare module "autocannon" {
  interface Histogram {
    average: number;
    mean: number;
    p50: number;
    p90: number;
    p97_5: number;
    p99: number;
    max: number;
  }
  interface Result {
    requests: Histogram & { total: number };
    latency: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    "2xx": number;
    duration: number;
  }
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    method?: string;
    headers?: Record<string, string>;
    body?: string;
    requests?: Array<{ method?: string; path?: string; headers?: Record<string, string>; body?: string }>;
  }
  function autocannon(opts: Options): Promise<Result>;
  export default autocannon;
}
