// The part of autocannon's API that lib/bench/consumer-api.ts uses (the package ships no types).
declare module 'autocannon' {
  type Latency = { p50: number; p90: number; p99: number; p99_9: number; max: number; mean: number };
  export type Result = {
    requests: { total: number; average: number };
    latency: Latency;
    errors: number;
    timeouts: number;
    non2xx: number;
    duration: number;
    statusCodeStats?: Record<string, { count: number }>;
  };
  export type Options = {
    url: string;
    connections?: number;
    duration?: number;
    overallRate?: number;
    headers?: Record<string, string>;
    requests?: { method?: string; path: string; headers?: Record<string, string> }[];
  };
  function autocannon(options: Options): Promise<Result>;
  export default autocannon;
}
