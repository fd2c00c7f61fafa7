// The slice of autocannon's API the benchmarks use (the package ships no types).
declare module 'autocannon' {
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
    non2xx: number;
    duration: number;
  }
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
    method?: string;
  }
  function autocannon(options: Options): Promise<Result>;
  export default autocannon;
}
