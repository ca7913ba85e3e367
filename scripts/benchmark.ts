// `npm run benchmark`: starts the project's PostgreSQL, a fresh benchmark database, the
// production server with the local fakes, seeds a synthetic lab through the app's own code,
// measures, prints a table, writes docs/benchmarks.md, and stops whatever it started.
// Not part of `npm test`. All load goes to 127.0.0.1. Helpers live in scripts/benchmark/.
import { randomBytes } from "node:crypto";
import { readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { performance } from "node:perf_hooks";
import { timeAnalysis, type Timing } from "./bench-analysis.ts";
import { mixedModelSection, timeMixedModels, type MixedModelTiming } from "./bench-models.ts";
import { AppServer, buildIfMissing, cluster, dropDatabase, freePort, freshDatabase, ROOT, scratchDir, startFakes, withClient } from "./benchmark/services.ts";
import { firstLoad, gzipSizeOf, vegaChunks, type FirstLoad } from "./benchmark/client-weight.ts";
import { expectPage, signInAll } from "./benchmark/http.ts";
import { loadPage, waitUntilIdle, type PageRun } from "./benchmark/pages.ts";
import { CONCURRENT_REPEAT_SHARE, LATER_REPEAT_SHARE, makeTester, readingsRound, verifyReadings, type RoundStats, type Verification } from "./benchmark/readings-load.ts";
import { createInsertTable, INSERT_SCRIPT, runPgbench, type PgbenchRun } from "./benchmark/pgbench.ts";
import { countQueries, setStatementLogging, type QueryCount } from "./benchmark/queries.ts";
import { num, range, spread, type Spread } from "./benchmark/stats.ts";
// The app's server modules read DATABASE_URL on first use, not at import: set before seeding.
import { PASSWORD, seedBenchmark, SIZES, type Seeded } from "./benchmark/seed.ts";

const REPETITIONS = 5;
const CONNECTIONS = 20;
const PAGE_SECONDS = Number(process.env.BLINDCUT_BENCH_PAGE_SECONDS ?? 4);
const READINGS_PER_ROUND = 20;
const PGBENCH_CLIENTS = 50;
const PGBENCH_SECONDS = 4;
const DATABASE = "blindcut_bench";
const TIME_LIMIT_MS = 15 * 60_000;

const log = (message: string) => console.log(`[benchmark] ${message}`);
const t0 = performance.now();
const elapsed = () => `${((performance.now() - t0) / 1000).toFixed(0)} s`;

// ---------- what this run started, stopped in `finally` ----------
let server: AppServer | null = null;
let fakes: Awaited<ReturnType<typeof startFakes>> | null = null;
let pgStarted = false;
let databaseCreated = false;
let scratch: string | null = null;
const pgCluster = await cluster();

async function cleanup() {
  if (server) await server.stop().catch(() => {});
  server?.close();
  server = null;
  if (fakes) await fakes.close();
  fakes = null;
  if (databaseCreated && process.env.BLINDCUT_BENCH_KEEP_DB !== "1") await dropDatabase(pgCluster, DATABASE).catch(() => {});
  databaseCreated = false;
  if (pgStarted && process.env.BLINDCUT_KEEP_DB !== "1") pgCluster.stopPostgres();
  pgStarted = false;
  if (scratch) rmSync(scratch, { recursive: true, force: true });
  scratch = null;
}
const watchdog = setTimeout(() => {
  console.error(`[benchmark] stopped: over the time limit of ${TIME_LIMIT_MS / 60_000} minutes`);
  void cleanup().finally(() => process.exit(2));
}, TIME_LIMIT_MS);
for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => void cleanup().finally(() => process.exit(130)));

type Results = {
  analysis: { small: Timing; large: Timing };
  mixedModel: MixedModelTiming[];
  weight: { minimal: FirstLoad; landing: FirstLoad; bench: FirstLoad; results: FirstLoad; vegaGzip: number; vegaChunks: number };
  postgres: { version: string; fsync: string; synchronousCommit: string; sharedBuffers: string; startedHere: boolean };
  seeded: Seeded;
  seedSeconds: number;
  rounds: RoundStats[];
  afterRounds: Verification;
  crash: RoundStats;
  afterCrash: Verification;
  pgbench: PgbenchRun[];
  pages: { floor: PageRun[]; landing: PageRun[]; run: PageRun[]; results: PageRun[] };
  queries: QueryCount[];
  runReadings: number;
};

async function main(): Promise<Results> {
  // 1. The analysis core, in this process, before anything else loads the machine.
  log("analysis core: 72,000 readings and 10×, 5 repetitions each");
  const small = timeAnalysis({ blades: 200, repetitions: REPETITIONS, label: "200 blades × 3 replicates × 40 checks × 3 positions" });
  const large = timeAnalysis({ blades: 2000, repetitions: REPETITIONS, label: "2,000 blades (10×)" });
  log("mixed model: 600 runs and 10×");
  const mixedModel = timeMixedModels();

  // 2. Services.
  log("PostgreSQL, a fresh benchmark database, the build, the local fakes");
  pgStarted = (await pgCluster.startPostgres()).started;
  const databaseUrl = await freshDatabase(pgCluster, DATABASE);
  databaseCreated = true;
  const postgres = await withClient(databaseUrl, async (c) => {
    const q = async (s: string) => (await c.query<{ v: string }>(`SELECT ${s} AS v`)).rows[0].v;
    return { version: await q("current_setting('server_version')"), fsync: await q("current_setting('fsync')"), synchronousCommit: await q("current_setting('synchronous_commit')"), sharedBuffers: await q("current_setting('shared_buffers')"), startedHere: pgStarted };
  });
  if (buildIfMissing()) log("built the app (build/ was missing)");
  const minimal = firstLoad("Minimal page (client entry + root route only)", null);
  const weight = {
    minimal,
    landing: firstLoad("Landing page (/)", "routes/home"),
    bench: firstLoad("Bench run page", "routes/bench/run"),
    results: firstLoad("Results page", "routes/results/study-results"),
    vegaGzip: gzipSizeOf(vegaChunks()),
    vegaChunks: vegaChunks().length,
  };
  if (weight.bench.vegaFiles.length) throw new Error(`the charts' library is in the bench page's first load: ${weight.bench.vegaFiles.join(", ")}`);
  scratch = scratchDir();
  fakes = await startFakes(scratch);

  // 3. The synthetic lab, through the app's own server modules.
  log("seeding the synthetic lab");
  process.env.DATABASE_URL = databaseUrl;
  const seedStarted = performance.now();
  const seeded = await seedBenchmark();
  const seedSeconds = (performance.now() - seedStarted) / 1000;
  log(`seeded ${seeded.counts.runs} runs and ${seeded.counts.readings.toLocaleString("en")} readings in ${seedSeconds.toFixed(0)} s (${elapsed()})`);

  // 4. The production server.
  const port = await freePort();
  server = new AppServer(port, { ...fakes.env, DATABASE_URL: databaseUrl, SESSION_SECRET: randomBytes(24).toString("hex"), BLINDCUT_INSECURE_COOKIES: "1" }, path.join(scratch, "server.log"));
  await server.start();
  const origin = server.origin;
  log(`app server on ${origin}; signing in the analyst and ${seeded.testerEmails.length} testers`);
  const [analystCookie, ...testerCookies] = await signInAll(origin, [seeded.analystEmail, ...seeded.testerEmails], PASSWORD);
  const lab = seeded.labId;
  const paths = {
    floor: "/bench-floor",
    run: `/labs/${lab}/bench/runs/${seeded.testerRunIds[0]}`,
    runSmall: `/labs/${lab}/bench/runs/${seeded.smallRunId}`,
    results: `/labs/${lab}/studies/${seeded.closedLargeId}/results`,
    resultsSmall: `/labs/${lab}/studies/${seeded.closedSmallId}/results`,
  };
  await expectPage(origin, paths.floor, null, ["Blindcut"]);
  await expectPage(origin, paths.run, testerCookies[0], ["Benchmark rope protocol"]);
  await expectPage(origin, paths.results, analystCookie, ["Closed study, large (synthetic)"]);

  // 5. Saving readings: 50 testers, rounds of 20 readings each; then the crash round.
  const testers = testerCookies.map((cookie, i) => makeTester(i, cookie, seeded.testerRunIds[i]));
  const rounds: RoundStats[] = [];
  for (let r = 0; r < REPETITIONS; r++) {
    const stats = await readingsRound(testers, origin, lab, READINGS_PER_ROUND, { timeLimitMs: 90_000 });
    rounds.push(stats);
    log(`readings round ${r + 1}: ${stats.newReadings} readings in ${stats.seconds.toFixed(1)} s, p50 ${stats.p50.toFixed(0)} ms, p95 ${stats.p95.toFixed(0)} ms (${elapsed()})`);
  }
  const afterRounds = await verifyReadings(databaseUrl, testers);
  const roundSeconds = spread(rounds.map((r) => r.seconds)).median;
  log("crash round: SIGKILL of the app server during the load, restart, retries");
  const crash = await readingsRound(testers, origin, lab, READINGS_PER_ROUND, { timeLimitMs: 120_000, crash: { afterMs: Math.max(300, roundSeconds * 400), server } });
  const afterCrash = await verifyReadings(databaseUrl, testers);
  log(`crash round: ${crash.newReadings} readings, ${crash.networkErrors} failed sends, lost ${afterCrash.lost}, doubled ${afterCrash.doubledKeys + afterCrash.doubledSlots} (${elapsed()})`);

  // 6. A plain INSERT on the same PostgreSQL.
  await createInsertTable(databaseUrl);
  const pgbench: PgbenchRun[] = [];
  for (let r = 0; r < REPETITIONS; r++) pgbench.push(runPgbench({ port: pgCluster.pgPort, database: DATABASE, clients: PGBENCH_CLIENTS, seconds: PGBENCH_SECONDS }));
  log(`pgbench: p95 ${spread(pgbench.map((p) => p.p95)).median.toFixed(2)} ms (${elapsed()})`);

  // 7. Page throughput, the three routes interleaved in each repetition.
  const targets = [
    { key: "floor" as const, path: paths.floor, cookie: null },
    { key: "landing" as const, path: "/", cookie: null },
    { key: "run" as const, path: paths.run, cookie: testerCookies[0] },
    { key: "results" as const, path: paths.results, cookie: analystCookie },
  ];
  for (const t of targets) {
    await loadPage(`${origin}${t.path}`, { cookie: t.cookie, connections: CONNECTIONS, seconds: 1 }); // warm-up
    await waitUntilIdle(origin);
  }
  const pages = { floor: [] as PageRun[], landing: [] as PageRun[], run: [] as PageRun[], results: [] as PageRun[] };
  for (let r = 0; r < REPETITIONS; r++) {
    for (const t of targets) {
      const run = await loadPage(`${origin}${t.path}`, { cookie: t.cookie, connections: CONNECTIONS, seconds: PAGE_SECONDS });
      if (run.non2xx || run.errors) throw new Error(`${t.path}: ${run.non2xx} answers other than 2xx and ${run.errors} errors under load`);
      pages[t.key].push(run);
      await waitUntilIdle(origin);
    }
    log(`pages repetition ${r + 1}: floor ${pages.floor[r].requestsPerSecond.toFixed(0)}, landing ${pages.landing[r].requestsPerSecond.toFixed(0)}, run ${pages.run[r].requestsPerSecond.toFixed(0)}, results ${pages.results[r].requestsPerSecond.toFixed(0)} req/s (${elapsed()})`);
  }

  // 8. Queries per page, small and large study.
  await setStatementLogging(databaseUrl, DATABASE, true);
  await server.stop();
  await server.start();
  let queries: QueryCount[];
  try {
    queries = await countQueries(path.resolve(`${pgCluster.dataDir}.log`), origin, [
      { label: "Floor (/bench-floor)", path: paths.floor, cookie: null },
      { label: `Run page, small study (${SIZES.runningSmall.blades * SIZES.runningSmall.replicates} runs, ${SIZES.runningSmall.readings} readings in the run)`, path: paths.runSmall, cookie: testerCookies[0] },
      { label: `Run page, large study (${seeded.counts.runningLargeRuns} runs, ${testers[0].acked.size} readings in the run)`, path: paths.run, cookie: testerCookies[0] },
      { label: `Results page, small closed study (${SIZES.closedSmall.blades * SIZES.closedSmall.replicates} runs)`, path: paths.resultsSmall, cookie: analystCookie },
      { label: `Results page, large closed study (${seeded.counts.closedLargeRuns} runs)`, path: paths.results, cookie: analystCookie },
    ]);
  } finally {
    await setStatementLogging(databaseUrl, DATABASE, false);
  }
  return { analysis: { small, large }, mixedModel, weight, postgres, seeded, seedSeconds, rounds, afterRounds, crash, afterCrash, pgbench, pages, queries, runReadings: testers[0].acked.size };
}

// ---------- the report ----------

const ms = (s: Spread, d = 0) => `${range(s, d)} ms`;
const kB = (bytes: number) => `${num(bytes / 1024, 1)} kB`;
const verdict = (ok: boolean) => (ok ? "met" : "**missed**");

function report(r: Results): { markdown: string; table: string } {
  const cpus = os.cpus();
  const when = new Date().toISOString().slice(0, 16).replace("T", " ");
  const a = r.analysis;
  const analysisRatio = a.large.medianMs / a.small.medianMs;
  const page = (runs: PageRun[]) => ({ rps: spread(runs.map((x) => x.requestsPerSecond)), p50: spread(runs.map((x) => x.p50)), p95: spread(runs.map((x) => x.p95)) });
  const floor = page(r.pages.floor);
  const landing = page(r.pages.landing);
  const ratioLanding = spread(r.pages.landing.map((x, i) => x.requestsPerSecond / r.pages.floor[i].requestsPerSecond));
  const run = page(r.pages.run);
  const results = page(r.pages.results);
  const ratioRun = spread(r.pages.run.map((x, i) => x.requestsPerSecond / r.pages.floor[i].requestsPerSecond));
  const ratioResults = spread(r.pages.results.map((x, i) => x.requestsPerSecond / r.pages.floor[i].requestsPerSecond));
  const post = { p50: spread(r.rounds.map((x) => x.p50)), p95: spread(r.rounds.map((x) => x.p95)), readings: spread(r.rounds.map((x) => x.readingsPerSecond)), requests: spread(r.rounds.map((x) => x.requestsPerSecond)) };
  const insert = { p50: spread(r.pgbench.map((x) => x.p50)), p95: spread(r.pgbench.map((x) => x.p95)), tps: spread(r.pgbench.map((x) => x.tps)) };
  const postRatio = post.p95.median / insert.p95.median;
  const w = r.weight;
  const benchRatio = w.bench.gzipBytes / w.minimal.gzipBytes;
  const sum = (k: keyof RoundStats) => r.rounds.reduce((s, x) => s + (x[k] as number), 0);
  const q = (label: string) => r.queries.find((x) => x.label.startsWith(label))!;
  const runQ = { small: q("Run page, small"), large: q("Run page, large") };
  const resQ = { small: q("Results page, small"), large: q("Results page, large") };
  const clean = (v: Verification) => v.lost === 0 && v.idMismatches === 0 && v.doubledKeys === 0 && v.doubledSlots === 0;

  const targets = [
    ["Analysis of 72,000 readings well under 1 s", `${num(a.small.medianMs)} ms`, verdict(a.small.medianMs < 1000)],
    ["Analysis 10× ≤ 12× the time", `${num(analysisRatio, 2)}×`, verdict(analysisRatio <= 12)],
    ["Run page ≥ ½ the floor's throughput", `${num(ratioRun.median, 3)} (${num(ratioRun.min, 3)}–${num(ratioRun.max, 3)})`, verdict(ratioRun.median >= 0.5)],
    ["Results page ≥ ⅓ the floor's throughput", `${num(ratioResults.median, 3)} (${num(ratioResults.min, 3)}–${num(ratioResults.max, 3)})`, verdict(ratioResults.median >= 1 / 3)],
    ["Reading POST p95 ≤ 10× a plain INSERT's p95", `${num(postRatio, 1)}×`, verdict(postRatio <= 10)],
    ["Zero lost, zero doubled readings", `lost ${r.afterRounds.lost}, doubled ${r.afterRounds.doubledKeys + r.afterRounds.doubledSlots}`, verdict(clean(r.afterRounds))],
    ["… also across the SIGKILL", `lost ${r.afterCrash.lost}, doubled ${r.afterCrash.doubledKeys + r.afterCrash.doubledSlots}`, verdict(clean(r.afterCrash))],
    ["Bench first-load JS ≤ 1.5× the minimal page", `${num(benchRatio, 2)}×`, verdict(benchRatio <= 1.5)],
    ["Charts' library absent from the bench page's first load", w.bench.vegaFiles.length ? w.bench.vegaFiles.join(", ") : "absent", verdict(w.bench.vegaFiles.length === 0)],
    ["Run page queries do not grow with the runs", `${runQ.small.perRequest} → ${runQ.large.perRequest}`, verdict(runQ.large.perRequest <= runQ.small.perRequest)],
    ["Results page queries do not grow with the runs", `${resQ.small.perRequest} → ${resQ.large.perRequest}`, verdict(resQ.large.perRequest <= resQ.small.perRequest)],
  ];
  const table = ["| target | measured | |", "|---|---|---|", ...targets.map((t) => `| ${t.join(" | ")} |`)].join("\n");
  const s = r.seeded;
  const notes = readFileSync(path.join(ROOT, "scripts/benchmark/notes.md"), "utf8").trim();

  const lines = [
    "# Benchmarks",
    "",
    `Measured ${when} UTC with \`npm run benchmark\` on ${cpus.length} × ${cpus[0]?.model ?? "unknown CPU"} (${cpus[0]?.speed ?? "?"} MHz), ${num(os.totalmem() / 2 ** 30, 1)} GiB memory, ${os.type()} ${os.release()}, Node.js ${process.version}, PostgreSQL ${r.postgres.version} (fsync ${r.postgres.fsync}, synchronous_commit ${r.postgres.synchronousCommit}, shared_buffers ${r.postgres.sharedBuffers}; ${r.postgres.startedHere ? "started by the benchmark" : "already running"}).`,
    "",
    "The machine is shared and noisy, and the load generator, the app server and PostgreSQL share its cores: read the ratios, each measured in the same run, before the absolute figures. Every figure is the median of 5 repetitions with its min–max in brackets, unless it says otherwise.",
    "",
    "## Targets",
    "",
    table,
    "",
    "## 1. Analysis core",
    "",
    "`timeAnalysis` (scripts/bench-analysis.ts) in the benchmark's own process: every per-run outcome from the raw readings, arm descriptives, 10,000-resample bootstrap intervals, comparisons and Kaplan–Meier / log-rank of a seeded synthetic parallel study.",
    "",
    "| study | readings | runs | median | min | max |",
    "|---|---|---|---|---|---|",
    ...[a.small, a.large].map((t) => `| ${t.label} | ${num(t.readings)} | ${num(t.runs)} | ${num(t.medianMs)} ms | ${num(t.minMs)} ms | ${num(t.maxMs)} ms |`),
    "",
    `Ratio 10× / 1× of the medians: **${num(analysisRatio, 2)}** (linear growth would be 10).`,
    "",
    "## 2. Page throughput",
    "",
    `autocannon (programmatic API), ${CONNECTIONS} connections, ${PAGE_SECONDS} s per measurement (not 10 s: 4 routes × 5 repetitions × 10 s would not fit the run time on 2 cores), after a 1 s warm-up per route; the routes interleaved in each repetition, and each measurement started only once the server had finished the requests the previous one left queued. Signed in through \`POST /sign-in\` (Origin header equal to the server's origin), the session cookie sent with every request. Latency percentiles from every response's time. No answer other than 2xx was accepted.`,
    "",
    "| route | requests/s | p50 | p95 | ratio to the floor (per repetition) |",
    "|---|---|---|---|---|",
    `| Floor: \`/bench-floor\` (fixed HTML, no data, no session) | ${range(floor.rps)} | ${ms(floor.p50, 1)} | ${ms(floor.p95, 1)} | 1 |`,
    `| For context: the landing page \`/\`, signed out (React-rendered, no query) | ${range(landing.rps)} | ${ms(landing.p50, 1)} | ${ms(landing.p95, 1)} | ${num(ratioLanding.median, 3)} (${num(ratioLanding.min, 3)}–${num(ratioLanding.max, 3)}) |`,
    `| Tester's run page, signed in as its tester (run in progress with ${r.runReadings} readings, study of ${s.counts.runningLargeRuns} runs) | ${range(run.rps)} | ${ms(run.p50, 1)} | ${ms(run.p95, 1)} | ${num(ratioRun.median, 3)} (${num(ratioRun.min, 3)}–${num(ratioRun.max, 3)}) |`,
    `| Analyst's results page (closed study, ${s.counts.closedLargeRuns} runs, ${num(s.counts.closedLargeReadings)} readings) | ${range(results.rps)} | ${ms(results.p50, 1)} | ${ms(results.p95, 1)} | ${num(ratioResults.median, 3)} (${num(ratioResults.min, 3)}–${num(ratioResults.max, 3)}) |`,
    "",
    "## 3. Saving readings",
    "",
    `${s.testerEmails.length} simulated testers at once, each signed in with its own session and saving to its own run in progress (large running study), one reading after another: \`POST /labs/:lab/api/runs/:run/readings\` with the bench's JSON body \`{ idempotencyKey, attempt, cut, position, kind, value }\` and a random UUID key made by the client. ${READINGS_PER_ROUND} new readings per tester per repetition (${READINGS_PER_ROUND * s.testerEmails.length} per repetition). On purpose, ${num(CONCURRENT_REPEAT_SHARE * 100)} % of readings are sent twice at once and ${num(LATER_REPEAT_SHARE * 100)} % are sent again with the same key after their answer; both must come back as the one stored reading. Latency covers every answered request (new and repeated).`,
    "",
    "| | median (min–max) |",
    "|---|---|",
    `| Reading POST p50 | ${ms(post.p50, 1)} |`,
    `| Reading POST p95 | ${ms(post.p95, 1)} |`,
    `| New readings stored per second | ${range(post.readings)} |`,
    `| Requests answered per second | ${range(post.requests)} |`,
    `| Plain INSERT p50 (pgbench) | ${ms(insert.p50, 2)} |`,
    `| Plain INSERT p95 (pgbench) | ${ms(insert.p95, 2)} |`,
    `| Plain INSERT transactions per second | ${range(insert.tps)} |`,
    `| **Ratio of the p95s, POST / INSERT** | **${num(postRatio, 1)}** |`,
    "",
    `Over the 5 repetitions: ${sum("newReadings")} new readings, ${sum("requests")} requests, ${sum("repeatsAtOnce")} readings sent twice at once, ${sum("repeatsAfterAnswer")} sent again after the answer, ${sum("repeatMismatches")} repeats answered with another reading, ${sum("serverErrors")} server errors, ${sum("networkErrors")} failed connections, ${r.rounds.reduce((n, x) => n + x.refusals.length, 0)} refusals${r.rounds.some((x) => x.refusals.length) ? ` (${[...new Set(r.rounds.flatMap((x) => x.refusals))].slice(0, 3).join("; ")})` : ""}.`,
    "",
    `Database check after the 5 repetitions: ${r.afterRounds.acknowledged} readings acknowledged, ${r.afterRounds.stored} stored in the testers' runs; **${r.afterRounds.lost} lost**, ${r.afterRounds.idMismatches} stored under another id, **${r.afterRounds.doubledKeys} keys stored twice, ${r.afterRounds.doubledSlots} cut/position slots stored twice**, ${r.afterRounds.storedUnacknowledged} stored but never acknowledged.`,
    "",
    `The plain INSERT: \`${INSERT_SCRIPT}\` as a pgbench custom script into a table of the benchmark database, \`pgbench ${r.pgbench[0].args.join(" ")}\` (5 repetitions of ${PGBENCH_SECONDS} s; latencies from the per-transaction log).`,
    "",
    "## 4. Crash",
    "",
    r.crash.crash
      ? `A sixth round of the same load; ${num(r.crash.crash.killedAfterMs)} ms into it, with ${r.crash.crash.inFlightAtKill} requests in flight, the app server got SIGKILL and was started again at once on the same port (down for ${num(r.crash.crash.downMs)} ms, until \`/healthz\` answered). The testers kept their sessions and retried every unanswered reading with its key until it was acknowledged: ${r.crash.networkErrors} sends failed, ${r.crash.serverErrors} got a server error, ${r.crash.recoveredByReplay} readings were first acknowledged as a replay (stored before the kill, answer lost), ${r.crash.gaveUp} given up, ${r.crash.refusals.length} refused.`
      : "The crash round finished before the kill was due: no crash was tested (rerun).",
    "",
    `Database check after the crash round: ${r.afterCrash.acknowledged} readings acknowledged in all, ${r.afterCrash.stored} stored; **${r.afterCrash.lost} lost**, ${r.afterCrash.idMismatches} stored under another id, **${r.afterCrash.doubledKeys + r.afterCrash.doubledSlots} stored twice**, ${r.afterCrash.storedUnacknowledged} stored but never acknowledged.`,
    "",
    "## 5. Client weight",
    "",
    "From React Router's client manifest (`build/client/assets/manifest-*.js`): the manifest itself, the client entry and its imports, the root route and the page's route module with their static imports, each gzipped at zlib's default level (what the server's compression sends). Lazy chunks are not part of a first load. Sizes are deterministic for a build: measured once.",
    "",
    "The minimal page is the client entry and the root route alone: what every React Router page of this app loads before its own route module (a route module that renders almost nothing adds under 1 kB, as the landing page shows). The floor route of section 2 renders no React and loads no JavaScript, so it cannot serve here.",
    "",
    "| page | files | raw | gzip | ratio to the minimal page |",
    "|---|---|---|---|---|",
    ...[w.minimal, w.landing, w.bench, w.results].map((f) => `| ${f.label} | ${f.files} | ${kB(f.rawBytes)} | ${kB(f.gzipBytes)} | ${num(f.gzipBytes / w.minimal.gzipBytes, 2)} |`),
    "",
    `The charts' library (${w.vegaChunks} chunks, ${kB(w.vegaGzip)} gzipped) is in neither the bench page's nor the results page's first load (${w.results.vegaFiles.length ? `**results page: ${w.results.vegaFiles.join(", ")}**` : "the results page loads it lazily when its charts mount"}); the benchmark fails if the bench page's first load contains it.`,
    "",
    "## 6. Queries per page",
    "",
    `Counted by \`ALTER DATABASE ${DATABASE} SET log_statement = 'all'\` (that database only), a restart of the app server so its pool connects with the setting, and the statements in the cluster's log during 3 requests per page after a warm-up request, divided by 3.`,
    "",
    "| page | SQL statements per request | statements |",
    "|---|---|---|",
    ...r.queries.map((x) => `| ${x.label} | ${x.perRequest} | ${x.statements.length ? x.statements.map((st) => `\`${st}\``).join(", ") : "none"} |`),
    "",
    "## The synthetic lab",
    "",
    `Seeded in ${num(r.seedSeconds)} s through the app's own server modules (protocol publishing, randomization, starting, the seeded simulator for finished runs, closing with the blinded snapshot, starting runs at the bench): ${s.testerEmails.length} testers, an analyst, a lead and an owner; a rope protocol (a check after every cut at three positions, cap 60 cuts); a closed study of ${s.counts.closedLargeRuns} runs and ${num(s.counts.closedLargeReadings)} readings and a closed study of 4 runs; a running study of ${s.counts.runningLargeRuns} runs (${s.counts.runningLargeFinished} finished, one run in progress per tester) and a running study of 4 runs. ${num(s.counts.readings)} readings before the load. All names and numbers are invented.`,
    "",
    mixedModelSection(r.mixedModel, when),
    "",
    "## Commands",
    "",
    "```",
    "npm run benchmark                        # everything above, about 4–5 minutes here",
    "BLINDCUT_PG_PORT=54349 npm run benchmark # on a cluster of its own (see Findings)",
    "npx tsx scripts/benchmark/profile.ts results   # profile one load on the kept database",
    "BLINDCUT_BENCH_KEEP_DB=1 npm run benchmark   # keep the blindcut_bench database afterwards",
    "BLINDCUT_BENCH_PAGE_SECONDS=10 npm run benchmark   # the issue's 10 s per page measurement",
    "npx tsx scripts/bench-analysis.ts        # the analysis core alone",
    "npx tsx scripts/bench-models.ts          # the mixed model alone; rewrites only its section here",
    "```",
    "",
    "## Findings",
    "",
    notes,
    "",
  ];
  return { markdown: lines.join("\n"), table };
}

try {
  const results = await main();
  await cleanup();
  const { markdown, table } = report(results);
  writeFileSync(path.join(ROOT, "docs/benchmarks.md"), markdown);
  console.log(`\n${table}\n`);
  console.log(markdown.slice(0, markdown.indexOf("\n## Findings")));
  log(`docs/benchmarks.md written (${elapsed()})`);
  clearTimeout(watchdog);
} catch (error) {
  console.error(`[benchmark] failed: ${error instanceof Error ? error.stack : String(error)}`);
  await cleanup();
  clearTimeout(watchdog);
  process.exitCode = 1;
}
