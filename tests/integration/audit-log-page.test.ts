// The lab's audit log page: its events, newest first, narrowed by the filters.
import { afterAll, describe, expect, it } from "vitest";
import { signUp } from "../support/accounts.ts";
import { closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

describe("audit log page", () => {
  it("lists the lab's events and narrows them by kind", async () => {
    const { client, labId } = await signUp("Audit Owner");
    const all = await client.get(`/labs/${labId}/audit`);
    expect(all.status).toBe(200);
    const html = await all.text();
    expect(html).toContain('data-testid="audit-table"');
    expect(html).toContain("lab.created");
    expect(html).toContain("Audit Owner");

    const created = await (await client.get(`/labs/${labId}/audit?kind=lab.created`)).text();
    expect(created).toContain('data-testid="audit-table"');

    const none = await (await client.get(`/labs/${labId}/audit?kind=study.closed`)).text();
    expect(none).toContain("No events match");
    expect(none).not.toContain('data-testid="audit-table"');
  });
});
