// For every route with an object id in its path, lab A's members ask for lab B's
// objects under lab A's URL: the answer is 404 and carries none of lab B's data.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { accessOutcome, fillPattern, flattenRoutes } from "../support/routes.ts";
import { buildWorld } from "../support/world.ts";
import { closeDb } from "~/server/db.server.ts";

let world: Awaited<ReturnType<typeof buildWorld>>;
beforeAll(async () => {
  world = await buildWorld();
}, 120_000);
afterAll(closeDb);

const NOT_IDS = new Set(["labId", "token", "step", "version"]);

describe("lab isolation", () => {
  it("another lab's ids under this lab's URLs answer 404 with no data, for GET and POST", async () => {
    const b = world.b;
    const foreign = [...b.ids.inventory, ...b.ids.steels, b.ids.sources, b.ids.heatTreatment, ...b.ids.armNames, ...b.ids.armDescriptions, b.tag];
    const routes = flattenRoutes().filter((r) => r.params.some((p) => !NOT_IDS.has(p)));
    let tried = 0;
    const failures: string[] = [];
    for (const route of routes) {
      const values = { ...world.aObjects };
      for (const p of route.params) if (!NOT_IDS.has(p)) values[p as keyof typeof values] = world.bObjects[p as keyof typeof values];
      const url = fillPattern(route.pattern, values);
      for (const role of ["owner", "lead", "tester", "analyst"] as const) {
        for (const method of ["GET", "POST"] as const) {
          const client = world.clients[role];
          const response = method === "GET" ? await client.get(url) : await client.post(url, {});
          tried++;
          const outcome = accessOutcome(response);
          const body = await response.text();
          // 403 (a role denied before any lookup) and 405 (no such method) reveal nothing either.
          if (!["404", "403", "405"].includes(outcome)) failures.push(`${method} ${route.pattern} as ${role}: ${outcome}`);
          const leaked = foreign.filter((s) => body.includes(s));
          if (leaked.length) failures.push(`${method} ${route.pattern} as ${role} leaked ${leaked.join(", ")}`);
        }
      }
    }
    console.log(`[lab isolation] ${routes.length} routes with ids, ${tried} requests with another lab's ids`);
    expect(failures).toEqual([]);
    expect(tried).toBeGreaterThan(50);
  });
});
