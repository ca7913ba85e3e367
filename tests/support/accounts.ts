// Builds labs and members through the app's own routes, as a person would.
import { expect } from "vitest";
import { AppClient } from "./app-client.ts";

let counter = 0;
export function uniqueEmail(prefix: string) {
  counter += 1;
  return `${prefix}-${process.env.VITEST_POOL_ID ?? 0}-${Date.now().toString(36)}-${counter}@lab.test`;
}

export const PASSWORD = "correct horse battery";

export async function signUp(name = "Test Owner") {
  const client = new AppClient();
  const email = uniqueEmail("owner");
  const response = await client.post("/sign-up", { name, email, password: PASSWORD, labName: `${name}'s lab` });
  expect(response.status).toBe(302);
  const labId = response.headers.get("location")!.split("/").pop()!;
  return { client, email, labId };
}

export async function signIn(email: string, password = PASSWORD) {
  const client = new AppClient();
  const response = await client.post("/sign-in", { email, password });
  return { client, response };
}

export function tokenFromLink(link: string) {
  return new URL(link).pathname.split("/").pop()!;
}

import { inject } from "vitest";
import { waitForMail, firstLink } from "./mail.ts";

/** Invites a new person with a role through the invitation route and accepts it: returns their signed-in client. */
export async function addMember(owner: AppClient, labId: string, role: "owner" | "lead" | "tester" | "analyst", name = `Test ${role}`) {
  const email = uniqueEmail(role);
  const invite = await owner.post(`/labs/${labId}/invitations`, { intent: "invite", email, role });
  expect(invite.status).toBe(200);
  const mail = await waitForMail(inject("mailDir"), email, /invited/);
  const token = tokenFromLink(firstLink(mail));
  const client = new AppClient();
  const accepted = await client.post(`/invitations/${token}`, { name, password: PASSWORD });
  expect(accepted.status).toBe(302);
  return { client, email, token };
}
