// `npm run audit:verify`: walks the audit chain of every lab and the readings' own
// hashes; names the first event that was changed, removed or inserted; exits 1 then.
import { db, closeDb } from "../app/server/db.server.ts";
import { verifyAuditChain } from "../app/server/audit-verify.server.ts";

const result = await verifyAuditChain(db());
await closeDb();
for (const p of result.problems) console.log(`PROBLEM ${p.detail} [lab ${p.labId ?? "none"}, id ${p.id}]`);
console.log(
  result.problems.length === 0
    ? `OK: ${result.events} audit events and ${result.readings} readings match their hashes.`
    : `FAILED: ${result.problems.length} problem(s) in ${result.events} audit events and ${result.readings} readings.`,
);
process.exit(result.problems.length === 0 ? 0 : 1);
