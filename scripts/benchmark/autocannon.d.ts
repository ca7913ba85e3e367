// The part of autocannon's programmatic API the benchmark uses (the package ships no types).
declare module "autocannon" {
  import type { EventEmitter } from "node:events";
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    pipelining?: number;
    headers?: Record<string, string>;
    method?: string;
    body?: string;
    timeout?: number;
  }
  interface Histogram {
    average: number;
    mean: number;
    p50: number;
    p90: number;
    p97_5: number;
    p99: number;
    total: number;
  }
  interface Result {
    requests: Histogram;
    latency: Histogram;
    throughput: Histogram;
    duration: number;
    errors: number;
    timeouts: number;
    non2xx: number;
  }
  interface Instance extends EventEmitter, PromiseLike<Result> {
    stop(): void;
  }
  function autocannon(options: Options): Instance;
  export default autocannon;
}
