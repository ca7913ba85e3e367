// Every route of app/routes.ts is requested (GET) as anonymous, owner, lead, tester and
// analyst of a lab, and as a member of another lab; each answer is compared with the
// access table committed beside this test. A new route without an entry fails here.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { accessOutcome, fillPattern, flattenRoutes } from "../support/routes.ts";
import { buildWorld } from "../support/world.ts";
import { closeDb } from "~/server/db.server.ts";

const ROLES = ["anonymous", "owner", "lead", "tester", "analyst", "otherLab"] as const;
const tablePath = path.resolve(import.meta.dirname, "route-matrix.expected.json");
type Table = Record<string, Record<(typeof ROLES)[number], string>>;

let world: Awaited<ReturnType<typeof buildWorld>>;
beforeAll(async () => {
  world = await buildWorld();
}, 120_000);
afterAll(closeDb);

describe("role × route matrix", () => {
  it("every route answers each role as the committed table says", async () => {
    const expected = JSON.parse(readFileSync(tablePath, "utf8")) as Table;
    const actual: Table = {};
    const routes = flattenRoutes();
    for (const route of routes) {
      const url = fillPattern(route.pattern, world.aObjects);
      const row = {} as Table[string];
      for (const role of ROLES) row[role] = accessOutcome(await world.clients[role].get(url));
      actual[route.pattern] = row;
    }
    // Then every action, posted empty: denials must come before any reading of the input.
    for (const route of routes) {
      if (route.pattern === "/sign-out") continue; // would end the sessions this sweep uses; tested in accounts.test.ts
      const url = fillPattern(route.pattern, world.aObjects);
      const row = {} as Table[string];
      for (const role of ROLES) row[role] = accessOutcome(await world.clients[role].post(url, {}));
      actual[`POST ${route.pattern}`] = row;
    }
    if (process.env.BLINDCUT_RECORD_MATRIX === "1") writeFileSync(tablePath, JSON.stringify(actual, null, 2) + "\n");
    const keys = Object.keys(actual);
    const missing = keys.filter((p) => !(p in expected));
    expect(missing, "routes without an entry in route-matrix.expected.json: decide who may open them and add them").toEqual([]);
    const stale = Object.keys(expected).filter((p) => !(p in actual));
    expect(stale, "entries for routes that no longer exist").toEqual([]);
    const mismatches = keys.flatMap((k) =>
      ROLES.filter((role) => expected[k][role] !== actual[k][role]).map((role) => `${k} as ${role}: expected ${expected[k][role]}, got ${actual[k][role]}`),
    );
    expect(mismatches).toEqual([]);
    // Invariants no table edit may break.
    for (const r of routes) {
      const row = actual[r.pattern];
      const post = actual[`POST ${r.pattern}`];
      if (r.params.includes("labId")) {
        expect(["404", "405"], `${r.pattern}: another lab's member must get 404`).toContain(row.otherLab);
        expect(["404", "405"], `POST ${r.pattern}: another lab's member must get 404`).toContain(post.otherLab);
        expect(["signin", "401", "404", "405"], `${r.pattern}: anonymous must sign in`).toContain(row.anonymous);
        expect(["signin", "401", "404", "405"], `POST ${r.pattern}: anonymous must sign in`).toContain(post.anonymous);
        for (const role of ROLES) expect(Number(post[role]) || 0, `POST ${r.pattern} as ${role} must never be a server error`).toBeLessThan(500);
      }
      if (/^\/labs\/:labId\/(blades|media|instruments|files|uploads|audit|members|invitations|planning)/.test(r.pattern)) {
        expect(["403", "404", "405"], `${r.pattern}: testers never open the library or lab management`).toContain(row.tester);
        expect(["403", "404", "405"], `POST ${r.pattern}: testers never change the library or lab management`).toContain(post.tester);
      }
      if (/results|report|analysis\.json|readings\.csv|outcomes\.csv|bundle\.json/.test(r.pattern)) expect(row.tester, `${r.pattern}: testers never read results`).toBe("403");
    }
    console.log(`[route matrix] ${routes.length} routes, GET and POST, × ${ROLES.length} roles = ${keys.length * ROLES.length} requests checked`);
  });
});
