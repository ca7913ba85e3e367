import { afterAll, describe, expect, inject, it } from "vitest";
import { sql } from "drizzle-orm";
import { AppClient } from "../support/app-client.ts";
import { addMember, PASSWORD, signIn, signUp, tokenFromLink, uniqueEmail } from "../support/accounts.ts";
import { firstLink, waitForMail } from "../support/mail.ts";
import { db, closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

describe("sign-up and sign-in", () => {
  it("sign-up creates the lab with the new user as its owner", async () => {
    const { client, labId } = await signUp("Ada Owner");
    const home = await client.get(`/labs/${labId}`);
    expect(home.status).toBe(200);
    const html = await home.text();
    expect(html).toContain("Ada Owner&#x27;s lab");
    expect(html).toContain("Your role: Owner");
    const rows = await db().execute(sql`SELECT action FROM audit_events WHERE lab_id = ${labId}`);
    expect(rows.rows.map((r) => r.action)).toContain("lab.created");
  });

  it("keeps the entered values and names the fields on bad sign-up input", async () => {
    const response = await new AppClient().post("/sign-up", { name: "", email: "not-an-address", password: "short", labName: "L" });
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("Enter your name");
    expect(html).toContain("Enter a valid e-mail address");
    expect(html).toContain("Use at least 10 characters");
    expect(html).toContain('value="not-an-address"');
  });

  it("signs in with the right password and refuses a wrong one", async () => {
    const { email } = await signUp();
    const good = await signIn(email);
    expect(good.response.status).toBe(302);
    expect(good.response.headers.get("set-cookie")).toMatch(/blindcut_session=.*HttpOnly.*SameSite=Lax/i);
    const bad = await signIn(email, "wrong password!");
    expect(bad.response.status).toBe(400);
    expect(await bad.response.text()).toContain("do not match an account");
  });

  it("stores only a hash of the session id, and a fresh id at every sign-in", async () => {
    const { email } = await signUp();
    const a = await signIn(email);
    const b = await signIn(email);
    const idA = a.client.cookies.get("blindcut_session")!;
    const idB = b.client.cookies.get("blindcut_session")!;
    expect(idA).not.toBe(idB);
    const stored = await db().execute(sql`SELECT id FROM sessions`);
    for (const row of stored.rows) expect(String(row.id)).toMatch(/^[0-9a-f]{64}$/);
  });

  it("pauses sign-in after 5 failures in 15 minutes, even with the right password", async () => {
    const { email } = await signUp();
    for (let i = 0; i < 5; i++) expect((await signIn(email, `wrong-${i}-password`)).response.status).toBe(400);
    const locked = await signIn(email);
    expect(locked.response.status).toBe(400);
    expect(await locked.response.text()).toContain("Too many failed attempts");
    // The counter lives in PostgreSQL, so another app server sees the same lock.
    const rows = await db().execute(sql`SELECT count(*)::int AS n FROM sign_in_failures WHERE email = ${email}`);
    expect(rows.rows[0].n).toBe(5);
  });

  it("sign-out ends the session server-side: the old cookie no longer works", async () => {
    const { client, labId } = await signUp();
    const cookie = client.cookies.get("blindcut_session")!;
    expect((await client.post("/sign-out", {})).status).toBe(302);
    const replay = new AppClient();
    replay.cookies.set("blindcut_session", cookie);
    const response = await replay.get(`/labs/${labId}`);
    expect(response.status).toBe(302);
    expect(response.headers.get("location")).toBe(`/sign-in?redirectTo=${encodeURIComponent(`/labs/${labId}`)}`);
  });

  it("a password change ends the user's other sessions and keeps this one", async () => {
    const { client, email, labId } = await signUp();
    const other = await signIn(email);
    const changed = await client.post("/account", { currentPassword: PASSWORD, newPassword: "a brand new passphrase" });
    expect(changed.status).toBe(200);
    expect((await client.get(`/labs/${labId}`)).status).toBe(200);
    expect((await other.client.get(`/labs/${labId}`)).status).toBe(302);
    expect((await signIn(email, "a brand new passphrase")).response.status).toBe(302);
  });

  it("does not follow a redirect to another host after sign-in", async () => {
    const { email } = await signUp();
    const client = new AppClient();
    const response = await client.post("/sign-in", { email, password: PASSWORD, redirectTo: "//evil.example/x" });
    expect(response.headers.get("location")).toBe("/labs");
  });
});

describe("invitations", () => {
  it("a new person accepts, sets a password and joins with the invited role", async () => {
    const { client: owner, labId } = await signUp();
    const { client: tester } = await addMember(owner, labId, "tester");
    const home = await tester.get(`/labs/${labId}`);
    expect(await home.text()).toContain("Your role: Tester");
  });

  it("an existing user accepts with one click", async () => {
    const { client: ownerA, labId: labA } = await signUp("Owner A");
    const { client: ownerB, email: emailB } = await signUp("Owner B");
    const invite = await ownerA.post(`/labs/${labA}/invitations`, { intent: "invite", email: emailB, role: "analyst" });
    expect(invite.status).toBe(200);
    const token = tokenFromLink(firstLink(await waitForMail(inject("mailDir"), emailB, /invited/)));
    const page = await ownerB.get(`/invitations/${token}`);
    expect(await page.text()).toContain("Join the lab");
    const accepted = await ownerB.post(`/invitations/${token}`, { intent: "accept" });
    expect(accepted.status).toBe(302);
    expect(await (await ownerB.get(`/labs/${labA}`)).text()).toContain("Your role: Analyst");
  });

  it("refuses a reused token and an expired one", async () => {
    const { client: owner, labId } = await signUp();
    const { token } = await addMember(owner, labId, "tester");
    const reuse = await new AppClient().post(`/invitations/${token}`, { name: "Someone else", password: PASSWORD });
    expect(reuse.status).toBe(410);
    expect(await (await new AppClient().get(`/invitations/${token}`)).text()).toContain("already been used");

    const email = uniqueEmail("late");
    await owner.post(`/labs/${labId}/invitations`, { intent: "invite", email, role: "tester" });
    const late = tokenFromLink(firstLink(await waitForMail(inject("mailDir"), email, /invited/)));
    await db().execute(sql`UPDATE invitations SET expires_at = now() - interval '1 minute' WHERE email = ${email}`);
    expect(await (await new AppClient().get(`/invitations/${late}`)).text()).toContain("has expired");
    expect((await new AppClient().post(`/invitations/${late}`, { name: "Late", password: PASSWORD })).status).toBe(410);
  });

  it("a lead may invite testers and analysts but not leads or owners", async () => {
    const { client: owner, labId } = await signUp();
    const { client: lead } = await addMember(owner, labId, "lead");
    const refused = await lead.post(`/labs/${labId}/invitations`, { intent: "invite", email: uniqueEmail("x"), role: "owner" });
    expect(refused.status).toBe(403);
    const allowed = await lead.post(`/labs/${labId}/invitations`, { intent: "invite", email: uniqueEmail("y"), role: "analyst" });
    expect(allowed.status).toBe(200);
  });

  it("lists pending invitations and revokes one", async () => {
    const { client: owner, labId } = await signUp();
    const email = uniqueEmail("revoked");
    await owner.post(`/labs/${labId}/invitations`, { intent: "invite", email, role: "tester" });
    const token = tokenFromLink(firstLink(await waitForMail(inject("mailDir"), email, /invited/)));
    const [row] = (await db().execute(sql`SELECT id FROM invitations WHERE email = ${email}`)).rows;
    expect(await (await owner.get(`/labs/${labId}/invitations`)).text()).toContain("Pending");
    expect((await owner.post(`/labs/${labId}/invitations`, { intent: "revoke", invitationId: String(row.id) })).status).toBe(200);
    expect(await (await new AppClient().get(`/invitations/${token}`)).text()).toContain("withdrawn");
  });
});

describe("password reset", () => {
  it("answers the same whether or not the address exists, and the link works once", async () => {
    const { email, labId } = await signUp();
    const known = await new AppClient().post("/forgot-password", { email });
    const unknown = await new AppClient().post("/forgot-password", { email: uniqueEmail("nobody") });
    const strip = (html: string) => html.replace(/<script[\s\S]*?<\/script>/g, "").replace(/"[^"]*"/g, "");
    expect(known.status).toBe(unknown.status);
    expect(strip(await known.text())).toBe(strip(await unknown.text()));

    const token = tokenFromLink(firstLink(await waitForMail(inject("mailDir"), email, /Reset/)));
    const client = new AppClient();
    const reset = await client.post(`/reset-password/${token}`, { password: "reset passphrase 42" });
    expect(reset.status).toBe(302);
    expect((await client.get(`/labs/${labId}`)).status).toBe(200);
    expect((await signIn(email, "reset passphrase 42")).response.status).toBe(302);
    expect((await new AppClient().post(`/reset-password/${token}`, { password: "another passphrase" })).status).toBe(410);
  });

  it("refuses a reset link older than one hour", async () => {
    const { email } = await signUp();
    await new AppClient().post("/forgot-password", { email });
    const token = tokenFromLink(firstLink(await waitForMail(inject("mailDir"), email, /Reset/)));
    await db().execute(sql`UPDATE password_resets SET expires_at = now() - interval '1 second'`);
    expect((await new AppClient().post(`/reset-password/${token}`, { password: "reset passphrase 42" })).status).toBe(410);
  });
});

describe("roles and lab isolation", () => {
  it("a tester and an analyst cannot open member management or invitations (403)", async () => {
    const { client: owner, labId } = await signUp();
    const { client: tester } = await addMember(owner, labId, "tester");
    const { client: analyst } = await addMember(owner, labId, "analyst");
    for (const client of [tester, analyst]) {
      expect((await client.get(`/labs/${labId}/members`)).status).toBe(403);
      expect((await client.get(`/labs/${labId}/invitations`)).status).toBe(403);
      expect((await client.post(`/labs/${labId}/invitations`, { intent: "invite", email: uniqueEmail("z"), role: "tester" })).status).toBe(403);
    }
  });

  it("a lead sees members but only an owner changes roles", async () => {
    const { client: owner, labId } = await signUp();
    const { client: lead } = await addMember(owner, labId, "lead");
    expect((await lead.get(`/labs/${labId}/members`)).status).toBe(200);
    const [row] = (await db().execute(sql`SELECT user_id FROM memberships WHERE lab_id = ${labId} AND role = 'owner'`)).rows;
    expect((await lead.post(`/labs/${labId}/members`, { intent: "change-role", userId: String(row.user_id), role: "tester" })).status).toBe(403);
  });

  it("a role change takes effect on the next request", async () => {
    const { client: owner, labId } = await signUp();
    const { client: member, email } = await addMember(owner, labId, "lead");
    expect((await member.get(`/labs/${labId}/members`)).status).toBe(200);
    const [row] = (await db().execute(sql`SELECT id FROM users WHERE email = ${email}`)).rows;
    const changed = await owner.post(`/labs/${labId}/members`, { intent: "change-role", userId: String(row.id), role: "tester" });
    expect(changed.status).toBe(200);
    expect((await member.get(`/labs/${labId}/members`)).status).toBe(403);
    const audit = await db().execute(sql`SELECT details FROM audit_events WHERE lab_id = ${labId} AND action = 'member.role_changed'`);
    expect(audit.rows[0].details).toEqual({ from: "lead", to: "tester" });
  });

  it("the last owner cannot be demoted or removed", async () => {
    const { client: owner, labId } = await signUp();
    const [row] = (await db().execute(sql`SELECT user_id FROM memberships WHERE lab_id = ${labId}`)).rows;
    const demote = await owner.post(`/labs/${labId}/members`, { intent: "change-role", userId: String(row.user_id), role: "lead" });
    expect(demote.status).toBe(409);
    expect(await demote.text()).toContain("last owner");
    expect((await owner.post(`/labs/${labId}/members`, { intent: "remove", userId: String(row.user_id) })).status).toBe(409);
  });

  it("a user of lab A gets 404 for every lab-B URL", async () => {
    const { client: a } = await signUp("Owner A");
    const { labId: labB } = await signUp("Owner B");
    for (const path of [`/labs/${labB}`, `/labs/${labB}/members`, `/labs/${labB}/invitations`]) {
      const response = await a.get(path);
      expect(response.status, path).toBe(404);
      expect(await response.text()).not.toContain("Owner B");
    }
    expect((await a.post(`/labs/${labB}/invitations`, { intent: "invite", email: uniqueEmail("q"), role: "tester" })).status).toBe(404);
    expect((await a.get(`/labs/not-a-uuid/members`)).status).toBe(404);
  });

  it("an anonymous visitor is sent to sign-in with the way back", async () => {
    const { labId } = await signUp();
    const response = await new AppClient().get(`/labs/${labId}/members`);
    expect(response.status).toBe(302);
    expect(response.headers.get("location")).toContain("/sign-in?redirectTo=");
  });
});
