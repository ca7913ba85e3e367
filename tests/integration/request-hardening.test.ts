// Accounts and requests under attack: mailed links, redirects, throttling, enumeration,
// body sizes, methods and media types, invitation rights. Each title names its finding.
import { afterAll, describe, expect, inject, it } from "vitest";
import { sql } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { addMember, PASSWORD, signIn, signUp, tokenFromLink, uniqueEmail } from "../support/accounts.ts";
import { firstLink, waitForMail, type CaughtMail } from "../support/mail.ts";
import { db, closeDb } from "~/server/db.server.ts";
import { readJson, BenchError } from "~/server/bench/api.server.ts";
import { MAX_CLIENT_FAILURES, MAX_FAILURES } from "~/server/throttle.server.ts";

// Without APP_URL the mailed origin must still come from configuration, never from the request.
delete process.env.APP_URL;

afterAll(closeDb);

const mailDir = () => inject("mailDir");

/** The newest reset mail to `email` whose link is not one of `seen`. */
async function nextResetLink(email: string, seen: string[] = []): Promise<string> {
  const deadline = Date.now() + 10_000;
  while (Date.now() < deadline) {
    const mail: CaughtMail = await waitForMail(mailDir(), email, /Reset your/);
    const link = firstLink(mail);
    if (!seen.includes(link)) return link;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no new reset mail to ${email}`);
}

async function rowCount(query: ReturnType<typeof sql>) {
  return Number((await db().execute(query)).rows[0].n);
}

describe("15.2 mailed links and reset tokens", () => {
  it("15.2 a reset link never takes its host from the request's Host or Origin header", async () => {
    const { email } = await signUp();
    const attacker = new AppClient();
    const response = await attacker.request("http://evil.example/forgot-password", {
      method: "POST",
      body: new URLSearchParams({ email }),
      headers: { "Content-Type": "application/x-www-form-urlencoded", Host: "evil.example", Origin: "http://evil.example" },
    });
    expect(response.status).toBe(200);
    const link = await nextResetLink(email);
    expect(new URL(link).hostname).not.toBe("evil.example");
    expect(link).not.toContain("evil.example");
    expect(new URL(link).hostname).toBe("localhost");
  });

  it("15.2 after a successful reset every other unused reset link of the user is void", async () => {
    const { email } = await signUp();
    const client = new AppClient();
    expect((await client.post("/forgot-password", { email })).status).toBe(200);
    const first = await nextResetLink(email);
    expect((await client.post("/forgot-password", { email })).status).toBe(200);
    const second = await nextResetLink(email, [first]);
    const done = await new AppClient().post(`/reset-password/${tokenFromLink(second)}`, { password: "a fresh passphrase 1" });
    expect(done.status).toBe(302);
    expect(await (await new AppClient().get(`/reset-password/${tokenFromLink(first)}`)).text()).toContain("This link no longer works");
    expect((await new AppClient().post(`/reset-password/${tokenFromLink(first)}`, { password: "an attacker passphrase" })).status).toBe(410);
    expect((await signIn(email, "a fresh passphrase 1")).response.status).toBe(302);
  });
});

describe("15.3 open redirect after sign-in", () => {
  const hostile = [
    "%2F%09%2Fevil.example%3A8099%2Fphish",
    "%2F%0A%2Fevil.example%2Fphish",
    "%2F%0D%2Fevil.example",
    "%2F%2Fevil.example",
    "%2F%5Cevil.example",
    "%2F%5C%5Cevil.example",
    "https%3A%2F%2Fevil.example",
    "%2F%00",
    "%2Flabs%2F..%2F%2Fevil.example",
  ];
  it("15.3 open redirect: a signed-in visit to /sign-in?redirectTo=… lands only on this site, never a 500", async () => {
    const { client } = await signUp();
    for (const target of hostile) {
      const response = await client.get(`/sign-in?redirectTo=${target}`);
      expect(response.status, target).toBe(302);
      const location = response.headers.get("location")!;
      expect(location, target).toBe("/labs");
    }
    const kept = await client.get(`/sign-in?redirectTo=${encodeURIComponent("/labs?tab=2#top")}`);
    expect(kept.headers.get("location")).toBe("/labs?tab=2#top");
  });

  it("15.3 open redirect: the sign-in form's redirectTo follows the same rule", async () => {
    const { email } = await signUp();
    const response = await new AppClient().post("/sign-in", { email, password: PASSWORD, redirectTo: "/\t/evil.example:8099/phish" });
    expect(response.status).toBe(302);
    expect(response.headers.get("location")).toBe("/labs");
  });
});

describe("15.5 sign-in throttling", () => {
  it("15.5 25 concurrent wrong passwords: no more than the limit are checked", async () => {
    const { email } = await signUp();
    const answers = await Promise.all(Array.from({ length: 25 }, (_, i) => signIn(email, `wrong password ${i}`).then(async (r) => r.response.text())));
    const checked = answers.filter((t) => t.includes("do not match an account")).length;
    const paused = answers.filter((t) => t.includes("Too many failed attempts")).length;
    expect(checked).toBeLessThanOrEqual(MAX_FAILURES);
    expect(checked + paused).toBe(25);
    expect(await rowCount(sql`SELECT count(*)::int AS n FROM sign_in_failures WHERE email = ${email}`)).toBe(MAX_FAILURES);
  });

  it("15.5 a limit per client address holds across accounts, and other clients are not affected", async () => {
    const { email: victim } = await signUp();
    const address = `203.0.113.77:${Math.random()}`;
    for (let i = 0; i < MAX_CLIENT_FAILURES; i++) {
      const response = await new AppClient({ clientAddress: address }).post("/sign-in", { email: uniqueEmail(`spray${i}`), password: "wrong password" });
      expect(await response.text()).toContain("do not match an account");
    }
    const blocked = await new AppClient({ clientAddress: address }).post("/sign-in", { email: victim, password: PASSWORD });
    expect(blocked.status).toBe(400);
    expect(await blocked.text()).toContain("Too many failed sign-ins from your network");
    expect((await signIn(victim)).response.status).toBe(302);
  });

  it("15.5 the reset path lifts an account's pause, so the owner is not locked out", async () => {
    const { email } = await signUp();
    for (let i = 0; i < MAX_FAILURES; i++) await signIn(email, `wrong password ${i}`);
    expect(await (await signIn(email)).response.text()).toContain("Too many failed attempts");
    expect((await new AppClient().post("/forgot-password", { email })).status).toBe(200);
    const link = await nextResetLink(email);
    expect((await new AppClient().post(`/reset-password/${tokenFromLink(link)}`, { password: "owner passphrase 2" })).status).toBe(302);
    expect((await signIn(email, "owner passphrase 2")).response.status).toBe(302);
  });
});

describe("15.7 enumeration and echoed passwords", () => {
  it("15.7 sign-up with a taken address never sends the submitted password back", async () => {
    const { email } = await signUp();
    const secret = "my-secret-passphrase-42";
    const response = await new AppClient().post("/sign-up", { name: "Someone", email, password: secret, labName: "Another lab" });
    expect(response.status).toBeLessThan(500);
    expect(await response.text()).not.toContain(secret);
    // The owner of the address is told instead.
    const notice = await waitForMail(mailDir(), email, /tried to create a Blindcut account/);
    expect(notice.text).not.toContain(secret);
  });

  it("15.7 a reset request answers the same way and in about the same time for known and unknown addresses", async () => {
    const known = await Promise.all([signUp(), signUp(), signUp(), signUp()]);
    const time = async (email: string) => {
      const started = performance.now();
      const response = await new AppClient().post("/forgot-password", { email });
      const html = await response.text();
      return { ms: performance.now() - started, status: response.status, sent: html.includes("If that address has an account") };
    };
    const knownTimes = [];
    const unknownTimes = [];
    for (let i = 0; i < known.length; i++) {
      knownTimes.push(await time(known[i].email));
      unknownTimes.push(await time(uniqueEmail("nobody")));
    }
    for (const t of [...knownTimes, ...unknownTimes]) expect(t).toMatchObject({ status: 200, sent: true });
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
    const gap = median(knownTimes.map((t) => t.ms)) - median(unknownTimes.map((t) => t.ms));
    // The mail goes out after the answer: a known address costs no visible extra time.
    expect(gap).toBeLessThan(25);
    await Promise.all(known.map((k) => waitForMail(mailDir(), k.email, /Reset your/)));
  });

  it("15.7 reset requests are throttled per address and per client", async () => {
    const { email } = await signUp();
    for (let i = 0; i < 5; i++) expect((await new AppClient().post("/forgot-password", { email })).status).toBe(200);
    await new Promise((r) => setTimeout(r, 500));
    expect(await rowCount(sql`SELECT count(*)::int AS n FROM password_resets r JOIN users u ON u.id = r.user_id WHERE u.email = ${email}`)).toBe(3);
    const address = `198.51.100.9:${Math.random()}`;
    for (let i = 0; i < 12; i++) await new AppClient({ clientAddress: address }).post("/forgot-password", { email: uniqueEmail("probe") });
    expect(await rowCount(sql`SELECT count(*)::int AS n FROM reset_requests WHERE client_address = ${address}`)).toBe(10);
  });
});

describe("15.10 request body size limits", () => {
  it("15.10 an oversized form to /sign-in is a 413, from the header and while streaming", async () => {
    const big = `email=a%40b.test&password=${"x".repeat(200_000)}`;
    const declared = await new AppClient().request("/sign-in", { method: "POST", body: big, headers: { "Content-Type": "application/x-www-form-urlencoded" } });
    expect(declared.status).toBe(413);
    // A chunked body has no Content-Length: the stream is counted and cut off.
    const chunk = new TextEncoder().encode("x".repeat(16_384));
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent++ >= 2000) controller.close();
        else controller.enqueue(chunk);
      },
    });
    const streamed = await new AppClient().request("/sign-in", { method: "POST", body: stream, headers: { "Content-Type": "application/x-www-form-urlencoded" }, duplex: "half" } as RequestInit);
    expect(streamed.status).toBe(413);
    expect(sent).toBeLessThan(100);
  });

  it("15.10 a JSON body over 2 MB is refused from the header and while streaming", async () => {
    const declared = new Request("http://localhost/x", { method: "POST", body: "{}", headers: { "Content-Type": "application/json", "Content-Length": String(3 * 1024 * 1024) } });
    await expect(readJson(declared)).rejects.toMatchObject({ status: 413 });
    const body = JSON.stringify({ values: "9".repeat(3 * 1024 * 1024) });
    const stream = new ReadableStream<Uint8Array>({ start(c) { c.enqueue(new TextEncoder().encode(body)); c.close(); } });
    const streamed = new Request("http://localhost/x", { method: "POST", body: stream, headers: { "Content-Type": "application/json" }, duplex: "half" } as RequestInit);
    await expect(readJson(streamed)).rejects.toMatchObject({ status: 413 });
  });
});

describe("15.13 methods, media types and invitation rights", () => {
  it("15.13 PUT, PATCH and DELETE are 405, not a POST in disguise", async () => {
    const { email, client, labId } = await signUp();
    for (const method of ["PUT", "PATCH", "DELETE"]) {
      const response = await new AppClient().request("/sign-in", { method, body: new URLSearchParams({ email, password: PASSWORD }), headers: { "Content-Type": "application/x-www-form-urlencoded" } });
      expect(response.status, method).toBe(405);
      expect(response.headers.get("allow")).toContain("POST");
      expect(response.headers.get("set-cookie"), method).toBeNull();
      const invite = await client.request(`/labs/${labId}/invitations`, { method, body: new URLSearchParams({ intent: "invite", email: uniqueEmail("m"), role: "tester" }), headers: { "Content-Type": "application/x-www-form-urlencoded" } });
      expect(invite.status, method).toBe(405);
    }
    expect(await rowCount(sql`SELECT count(*)::int AS n FROM invitations WHERE lab_id = ${labId}`)).toBe(0);
  });

  it("15.13 the JSON check parses the media type instead of looking for a substring", async () => {
    const sneaky = new Request("http://localhost/x", { method: "POST", body: "{}", headers: { "Content-Type": "text/plain; note=application/json" } });
    await expect(readJson(sneaky)).rejects.toBeInstanceOf(BenchError);
    await expect(readJson(new Request("http://localhost/x", { method: "POST", body: "{}", headers: { "Content-Type": "text/plain; note=application/json" } }))).rejects.toMatchObject({ status: 415 });
    expect(await readJson(new Request("http://localhost/x", { method: "POST", body: '{"a":1}', headers: { "Content-Type": "Application/JSON; charset=utf-8" } }))).toEqual({ a: 1 });
  });

  it("15.13 a lead cannot revoke an owner's invitation of a lead", async () => {
    const { client: owner, labId } = await signUp();
    const lead = await addMember(owner, labId, "lead");
    const invitedLead = uniqueEmail("lead2");
    expect((await owner.post(`/labs/${labId}/invitations`, { intent: "invite", email: invitedLead, role: "lead" })).status).toBe(200);
    const [{ id }] = (await db().execute(sql`SELECT id FROM invitations WHERE email = ${invitedLead}`)).rows as { id: string }[];
    const refused = await lead.client.post(`/labs/${labId}/invitations`, { intent: "revoke", invitationId: id });
    expect(refused.status).toBe(403);
    expect(await rowCount(sql`SELECT count(*)::int AS n FROM invitations WHERE id = ${id} AND revoked_at IS NULL`)).toBe(1);
    // What the lead may grant, the lead may take back.
    const tester = uniqueEmail("tester");
    await owner.post(`/labs/${labId}/invitations`, { intent: "invite", email: tester, role: "tester" });
    const [{ id: testerInvite }] = (await db().execute(sql`SELECT id FROM invitations WHERE email = ${tester}`)).rows as { id: string }[];
    expect((await lead.client.post(`/labs/${labId}/invitations`, { intent: "revoke", invitationId: testerInvite })).status).toBe(200);
  });
});
