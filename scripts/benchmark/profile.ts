// Profiles the production server on the benchmark database left by
// `BLINDCUT_KEEP_DB=1 BLINDCUT_BENCH_KEEP_DB=1 npm run benchmark`: the server runs with
// --cpu-prof while one page (or the reading POSTs) is under load, and the functions with the
// most self time are printed. Run: npx tsx scripts/benchmark/profile.ts run|results|floor|post
import { mkdtempSync, readdirSync, readFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { randomBytes } from "node:crypto";
import { AppServer, cluster, freePort, withClient } from "./services.ts";
import { signInAll } from "./http.ts";
import { loadPage } from "./pages.ts";
import { makeTester, readingsRound } from "./readings-load.ts";
import { PASSWORD } from "./seed.ts";

const what = process.argv[2] ?? "results";
const c = await cluster();
const url = c.databaseUrl("blindcut_bench");
const ids = await withClient(url, async (db) => {
  const lab = (await db.query("SELECT id FROM labs LIMIT 1")).rows[0].id as string;
  const study = (name: string) => db.query("SELECT id FROM studies WHERE short_name = $1", [name]).then((r) => r.rows[0].id as string);
  const closed = await study("Closed study, large (synthetic)");
  const running = await study("Running study, large (synthetic)");
  const runsOf = (await db.query("SELECT r.id, u.email FROM runs r JOIN users u ON u.id = r.tester_id WHERE r.study_id = $1 AND r.state = 'in_progress' ORDER BY u.email", [running])).rows as { id: string; email: string }[];
  return { lab, closed, runsOf };
});
const dir = mkdtempSync(path.join(os.tmpdir(), "blindcut-profile-"));
const server = new AppServer(await freePort(), { DATABASE_URL: url, SESSION_SECRET: randomBytes(24).toString("hex"), BLINDCUT_INSECURE_COOKIES: "1" }, path.join(dir, "server.log"), ["--cpu-prof", `--cpu-prof-dir=${dir}`]);
await server.start();
const [analyst, ...testers] = await signInAll(server.origin, ["analyst@bench.test", ...ids.runsOf.map((r) => r.email)], PASSWORD);
if (what === "post") {
  const sim = testers.map((cookie, i) => makeTester(1000 + i, cookie, ids.runsOf[i].id));
  // Continue each run after the readings already stored.
  const stored = await withClient(url, (db) => db.query("SELECT run_id, count(*)::int AS n FROM readings WHERE run_id = ANY($1::uuid[]) GROUP BY run_id", [ids.runsOf.map((r) => r.id)]));
  for (const t of sim) t.next = stored.rows.find((r) => r.run_id === t.runId)?.n ?? 0;
  const s = await readingsRound(sim, server.origin, ids.lab, 10, { timeLimitMs: 60_000 });
  console.log(`post: ${s.newReadings} readings, p50 ${s.p50.toFixed(0)} ms, p95 ${s.p95.toFixed(0)} ms, ${s.requestsPerSecond.toFixed(0)} req/s`);
} else {
  const target = { floor: ["/bench-floor", null], run: [`/labs/${ids.lab}/bench/runs/${ids.runsOf[0].id}`, testers[0]], results: [`/labs/${ids.lab}/studies/${ids.closed}/results`, analyst] }[what] as [string, string | null];
  const r = await loadPage(`${server.origin}${target[0]}`, { cookie: target[1], connections: 20, seconds: 5 });
  console.log(`${what}: ${r.requestsPerSecond.toFixed(1)} req/s, p50 ${r.p50.toFixed(1)} ms, p95 ${r.p95.toFixed(1)} ms, non-2xx ${r.non2xx}`);
}
await server.stop();
server.close();

type Node = { id: number; callFrame: { functionName: string; url: string; lineNumber: number }; hitCount?: number };
const file = readdirSync(dir).find((f) => f.endsWith(".cpuprofile"));
if (!file) throw new Error("no profile written");
const profile = JSON.parse(readFileSync(path.join(dir, file), "utf8")) as { nodes: Node[] };
const total = profile.nodes.reduce((s, n) => s + (n.hitCount ?? 0), 0);
const byFn = new Map<string, number>();
const byFile = new Map<string, number>();
for (const n of profile.nodes) {
  const where = n.callFrame.url.replace(/^file:\/\//, "").replace(`${process.cwd()}/`, "") || "(native)";
  const pkg = /node_modules\/((?:@[^/]+\/)?[^/]+)/.exec(where)?.[1] ?? where;
  const key = `${n.callFrame.functionName || "(anonymous)"} ${where}:${n.callFrame.lineNumber + 1}`;
  byFn.set(key, (byFn.get(key) ?? 0) + (n.hitCount ?? 0));
  byFile.set(pkg, (byFile.get(pkg) ?? 0) + (n.hitCount ?? 0));
}
const top = (m: Map<string, number>, n: number) => [...m].sort((a, b) => b[1] - a[1]).slice(0, n).map(([k, v]) => `${((100 * v) / total).toFixed(1).padStart(5)} %  ${k}`).join("\n");
console.log(`\nself time by package or file:\n${top(byFile, 15)}\n\nself time by function:\n${top(byFn, 25)}\n\nprofile: ${path.join(dir, file)}`);
