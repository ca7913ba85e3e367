// The SQL a signed-in page spends on who is asking: the session, its user and the memberships
// are read in one statement per request, however many loaders the page has.
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import pg from "pg";
import { AppClient } from "../support/app-client.ts";
import { addMember, signUp } from "../support/accounts.ts";
import { closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

// Every statement the app's pool sends goes through pg's Client.query (Drizzle included).
const sent: string[] = [];
const originalQuery = pg.Client.prototype.query;
let counting = false;
beforeAll(() => {
  pg.Client.prototype.query = function (this: pg.Client, ...args: unknown[]) {
    const first = args[0];
    if (counting) sent.push(typeof first === "string" ? first : String((first as { text?: string })?.text ?? ""));
    return (originalQuery as (...a: unknown[]) => unknown).apply(this, args);
  } as typeof pg.Client.prototype.query;
});
afterAll(() => {
  pg.Client.prototype.query = originalQuery;
});
afterEach(() => {
  counting = false;
  sent.length = 0;
});

async function statementsOf(send: () => Promise<Response>) {
  sent.length = 0;
  counting = true;
  const response = await send();
  await response.text();
  counting = false;
  // Who is asking: the session (with its user) and the asker's own memberships, by user id.
  // (A members page also lists the lab's members: a query by lab, not about the asker.)
  const who = sent.filter((s) => /from "sessions"|"memberships"\."user_id" = \$/.test(s));
  return { status: response.status, who, all: [...sent] };
}

describe("statements per signed-in request", () => {
  it("a lab page reads the session, the user and the membership in one statement", async () => {
    const { client, labId } = await signUp();
    const page = await statementsOf(() => client.get(`/labs/${labId}/members`));
    expect(page.status).toBe(200);
    expect(page.who).toHaveLength(1);
    expect(page.who[0]).toMatch(/"sessions".*"users".*"memberships".*"labs"/s);
  });

  it("a client navigation (every loader in one data request) also costs one statement", async () => {
    const { client, labId } = await signUp();
    const data = await statementsOf(() => client.get(`/labs/${labId}/members.data`));
    expect(data.status).toBe(200);
    expect(data.who).toHaveLength(1);
  });

  it("the next request reads again: a changed role and a sign-out take effect at once", async () => {
    const { client: owner, labId } = await signUp();
    const { client: lead } = await addMember(owner, labId, "lead");
    const before = await statementsOf(() => lead.get(`/labs/${labId}/members`));
    expect(before.status).toBe(200);
    const again = await statementsOf(() => lead.get(`/labs/${labId}/members`));
    expect(again.who).toHaveLength(1);
    const oldCookie = new AppClient();
    oldCookie.cookies = new Map(lead.cookies);
    expect((await lead.post("/sign-out", {})).status).toBe(302);
    expect((await oldCookie.get(`/labs/${labId}/members`)).status).toBe(302);
  });
});
