// `npm test` after setup: type check, build, then every Vitest project (unit,
// integration against the real PostgreSQL, browser tests in Chromium). Ends with
// one plain line `N passed, N failed` counted from the runners' results.
// `npm test -- --quick <vitest filters>` skips the type check and the build and
// runs only the chosen tests (a quick re-run; the full command is what CI runs).
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync, mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..");
const bin = (name: string) => path.join(root, "node_modules/.bin", name);
let passed = 0;
let failed = 0;

function step(label: string, cmd: string, args: string[]) {
  console.log(`\n[blindcut] ${label}`);
  const ok = spawnSync(cmd, args, { stdio: "inherit", cwd: root }).status === 0;
  if (ok) passed++;
  else failed++;
  console.log(`[blindcut] ${label}: ${ok ? "passed" : "FAILED"}`);
  return ok;
}

const args = process.argv.slice(2);
const quick = args.includes("--quick");
const summaryArg = args.find((a) => a.startsWith("--summary-file="));
const extra = args.filter((a) => a !== "--quick" && a !== summaryArg);
let built = true;
if (!quick) {
  step("type check (react-router typegen && tsc)", "npm", ["run", "-s", "typecheck"]);
  built = step("production build", bin("react-router"), ["build"]);
}

if (built) {
  // Per process, so a test run started inside another one never reads the other's results.
  const out = path.join(root, `.blindcut/vitest-results-${process.pid}.json`);
  mkdirSync(path.dirname(out), { recursive: true });
  rmSync(out, { force: true });
  spawnSync(bin("vitest"), ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${out}`, ...extra], {
    stdio: "inherit",
    cwd: root,
  });
  try {
    const results = JSON.parse(readFileSync(out, "utf8")) as { numPassedTests: number; numFailedTests: number; numTotalTests: number; success: boolean };
    passed += results.numPassedTests;
    failed += results.numFailedTests;
    // A suite that failed to load (syntax error, failed setup) has no failed test but is still a failure.
    if (!results.success && results.numFailedTests === 0) failed++;
    if (results.numTotalTests === 0) failed++;
  } catch {
    console.error("[blindcut] vitest wrote no results");
    failed++;
  }
  rmSync(out, { force: true });
}

const summary = `${passed} passed, ${failed} failed`;
// The test command repeats it as the last line if it prints anything after this process ends.
if (summaryArg) writeFileSync(summaryArg.slice("--summary-file=".length), summary + "\n");
console.log(`\n${summary}`);
process.exit(failed === 0 ? 0 : 1);
