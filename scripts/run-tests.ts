// `npm test` after setup: type check, build, then every Vitest project (unit,
// integration against the real PostgreSQL, browser tests in Chromium). Ends with
// one plain line `N passed, N failed` counted from the runners' results.
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync, mkdirSync } from "node:fs";
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

step("type check (react-router typegen && tsc)", "npm", ["run", "-s", "typecheck"]);
const built = step("production build", bin("react-router"), ["build"]);

if (built) {
  const out = path.join(root, ".blindcut/vitest-results.json");
  mkdirSync(path.dirname(out), { recursive: true });
  rmSync(out, { force: true });
  const extra = process.argv.slice(2);
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
}

console.log(`\n${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
