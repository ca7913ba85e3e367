// Property-based fuzzing of every form action and API route with malformed, oversized,
// wrong-typed and boundary values (fast-check, fixed seed): never a 5xx, and a refused
// request leaves no partial write behind.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import { sql } from "drizzle-orm";
import { fillPattern, flattenRoutes } from "../support/routes.ts";
import { buildWorld } from "../support/world.ts";
import { db, closeDb } from "~/server/db.server.ts";
import type { AppClient } from "../support/app-client.ts";

let world: Awaited<ReturnType<typeof buildWorld>>;
beforeAll(async () => {
  world = await buildWorld();
}, 120_000);
afterAll(closeDb);

const FIELDS = ["intent", "email", "password", "name", "labName", "role", "userId", "invitationId", "inventoryNumber", "steel", "hardnessHrc", "edgeAngleDeg", "bladeLengthMm", "edgeLengthMm", "status", "kind", "on", "holder", "lotCode", "receivedOn", "sizeMm", "resolution", "calibrationIntervalDays", "referenceValue", "reading", "tolerance", "csv", "content", "seed", "fromVersion", "shortName", "question", "design", "armId", "bladeId", "confirm", "code", "reason", "value", "cut", "position"];
const NASTY = ["", " ", "-1", "0", "1e309", "-0", "NaN", "Infinity", "null", "undefined", "true", "[]", "{}", "{\"a\":", "<script>alert(1)</script>", "' OR 1=1 --", "\u0000", "\uFFFF", "😀".repeat(50), "x".repeat(70_000), "00000000-0000-0000-0000-000000000000", "2026-02-30", "99999-01-01", "../../etc/passwd", "%00", "1,5", "1.5.5"];

const value = fc.oneof(fc.constantFrom(...NASTY), fc.string({ maxLength: 40 }), fc.integer().map(String), fc.double({ noNaN: false }).map(String), fc.string({ unit: "grapheme", maxLength: 30 }));
const formBody = fc.dictionary(fc.oneof(fc.constantFrom(...FIELDS), fc.string({ maxLength: 12 })), value, { maxKeys: 8 });
const jsonBody = fc.oneof(
  fc.anything({ maxDepth: 3 }),
  fc.record({ idempotencyKey: fc.oneof(fc.uuid(), value), cut: fc.oneof(fc.integer(), fc.double(), value), position: value, kind: value, value: fc.oneof(fc.double(), value), readingId: value, reason: value, supersedesId: value }, { requiredKeys: [] }),
);

const WRITE_TABLES = ["labs", "users", "memberships", "invitations", "password_resets", "blades", "custody_events", "media", "media_lots", "instruments", "calibration_checks", "stored_files", "protocols", "protocol_versions", "studies", "study_arms", "study_blades", "study_testers", "runs", "readings", "run_events", "audit_events", "randomization_rolls"];
async function fingerprint() {
  const counts = await db().execute(sql.raw(`SELECT ${WRITE_TABLES.map((t) => `(SELECT count(*) FROM ${t})::int AS ${t}`).join(", ")}`));
  const updated = await db().execute(sql`SELECT coalesce(max(updated_at), 'epoch') AS studies, (SELECT coalesce(max(updated_at), 'epoch') FROM runs) AS runs, (SELECT coalesce(max(updated_at), 'epoch') FROM blades) AS blades FROM studies`);
  return JSON.stringify([counts.rows[0], updated.rows[0]]);
}

async function send(client: AppClient, url: string, body: unknown, kind: "form" | "json" | "garbage") {
  if (kind === "json") return client.request(url, { method: "POST", body: JSON.stringify(body), headers: { "Content-Type": "application/json" } });
  if (kind === "garbage") return client.request(url, { method: "POST", body: String(body), headers: { "Content-Type": "multipart/form-data; boundary=----nope" } });
  return client.post(url, body as Record<string, string>);
}

describe("hostile input", () => {
  it("no route answers 5xx, and a refused request writes nothing", async () => {
    const routes = flattenRoutes().filter((r) => r.pattern !== "/sign-out" && r.pattern !== "/*");
    const failures: string[] = [];
    let tried = 0;
    const passes = [
      { client: world.clients.owner, values: world.aObjects },
      { client: world.b.testers[0].client, values: world.bObjects },
      { client: world.b.lead.client, values: world.bObjects },
    ];
    for (const [p, pass] of passes.entries()) {
      for (const route of routes) {
        const url = fillPattern(route.pattern, pass.values);
        const forms = fc.sample(formBody, { numRuns: 5, seed: 1000 + p });
        const jsons = fc.sample(jsonBody, { numRuns: 4, seed: 2000 + p });
        const inputs: [unknown, "form" | "json" | "garbage"][] = [...forms.map((b) => [b, "form"] as [unknown, "form"]), ...jsons.map((b) => [b, "json"] as [unknown, "json"]), ["--x\r\nContent-Disposition: form-data\r\n\r\n", "garbage"]];
        for (const [body, kind] of inputs) {
          const before = await fingerprint();
          const response = await send(pass.client, url, body, kind);
          tried++;
          if (response.status >= 500) failures.push(`${route.pattern} (${kind}) answered ${response.status}: ${JSON.stringify(body).slice(0, 120)}`);
          if (response.status >= 400 && (await fingerprint()) !== before) failures.push(`${route.pattern} (${kind}) refused with ${response.status} but changed the database: ${JSON.stringify(body).slice(0, 120)}`);
        }
      }
    }
    console.log(`[hostile input] ${tried} malformed requests tried across ${routes.length} routes`);
    expect(failures).toEqual([]);
    expect(tried).toBeGreaterThan(1000);
  }, 180_000); // about 1,900 requests: seconds on a quiet machine, minutes on a loaded one
});
