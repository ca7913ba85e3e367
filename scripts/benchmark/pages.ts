// Page throughput with autocannon's programmatic API: a fixed number of connections for a
// fixed time on loopback, signed in by the session cookie. Latency percentiles come from
// every response's own time (autocannon's summary has no p95).
import autocannon from "autocannon";
import { performance } from "node:perf_hooks";
import { percentile } from "./stats.ts";

export type PageRun = { requestsPerSecond: number; p50: number; p95: number; responses: number; non2xx: number; errors: number; seconds: number };

export async function loadPage(url: string, options: { cookie: string | null; connections: number; seconds: number }): Promise<PageRun> {
  const times: number[] = [];
  let non2xx = 0;
  const started = process.hrtime.bigint();
  const instance = autocannon({ url, connections: options.connections, duration: options.seconds, timeout: 30, headers: options.cookie ? { cookie: options.cookie } : {} });
  instance.on("response", (_client: unknown, statusCode: number, _bytes: number, responseTime: number) => {
    times.push(responseTime);
    if (statusCode < 200 || statusCode >= 300) non2xx++;
  });
  const result = await instance;
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  return {
    requestsPerSecond: (times.length - non2xx) / seconds,
    p50: percentile(times, 50),
    p95: percentile(times, 95),
    responses: times.length,
    non2xx,
    errors: result.errors,
    seconds,
  };
}

/**
 * Waits until the server has finished the requests a measurement left queued (autocannon
 * stops sending at the deadline; the server still works through what it accepted), so the
 * next measurement starts on an idle server. Bounded: at most `limitMs`.
 */
export async function waitUntilIdle(origin: string, limitMs = 20_000) {
  const deadline = Date.now() + limitMs;
  let quick = 0;
  while (Date.now() < deadline && quick < 3) {
    const started = performance.now();
    await (await fetch(`${origin}/bench-floor`)).arrayBuffer();
    quick = performance.now() - started < 25 ? quick + 1 : 0;
    await new Promise((r) => setTimeout(r, 50));
  }
}
