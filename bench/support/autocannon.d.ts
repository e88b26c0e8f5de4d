// The part of autocannon's API the benchmarks use (the package ships no type declarations).
declare module 'autocannon' {
  interface Histogram {
    average: number;
    mean: number;
    stddev: number;
    min: number;
    max: number;
    total: number;
    p50: number;
    p90: number;
    p97_5: number;
    p99: number;
  }
  interface Result {
    requests: Histogram;
    latency: Histogram;
    throughput: Histogram;
    errors: number;
    timeouts: number;
    non2xx: number;
    duration: number;
    '2xx': number;
  }
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    amount?: number;
    pipelining?: number;
    headers?: Record<string, string>;
    method?: string;
  }
  function autocannon(options: Options): Promise<Result>;
  export default autocannon;
}
