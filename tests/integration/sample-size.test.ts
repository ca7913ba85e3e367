import { afterAll, describe, expect, it } from "vitest";
import { AppClient } from "../support/app-client.ts";
import { addMember, signUp } from "../support/accounts.ts";
import { closeDb } from "~/server/db.server.ts";

afterAll(closeDb);

const page = (labId: string, query: Record<string, string> | string = "") =>
  `/labs/${labId}/planning/sample-size${typeof query === "string" ? query : `?${new URLSearchParams(query)}`}`;

function figure(html: string, testId: string): string {
  const match = html.match(new RegExp(`data-testid="${testId}"[^>]*>([^<]*)<`));
  if (!match) throw new Error(`no ${testId} on the page`);
  return match[1];
}

describe("sample-size planner: the numbers", () => {
  // Source: J. Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, 2nd ed.,
  // table 2.4.1 (two-sample t, two-sided alpha 0.05, power 0.80): d = 0.5 needs 64 per group,
  // d = 0.8 needs 26. Exact noncentral-t values before rounding up, 63.8 and 25.5:
  // ../shared/docs/references.md.
  it.each([
    { d: 0.5, sd: "30", difference: "15", n: "64", exact: 63.8 },
    { d: 0.8, sd: "10", difference: "8", n: "26", exact: 25.5 },
  ])("d = $d at alpha 0.05 and power 0.80 gives $n blades per arm (Cohen 1988, table 2.4.1)", async ({ sd, difference, n, exact }) => {
    const { client, labId } = await signUp();
    const response = await client.get(page(labId, { design: "two-sample", unit: "cuts", sd, difference, alpha: "0.05", power: "0.8" }));
    expect(response.status).toBe(200);
    const html = await response.text();
    expect(figure(html, "proposed-n")).toBe(n);
    expect(Number(figure(html, "exact-n"))).toBeCloseTo(exact, 1);
    const power = Number(figure(html, "achieved-power").replace(/[^0-9.]/g, ""));
    expect(power).toBeGreaterThanOrEqual(80);
    expect(power).toBeLessThan(82);
    // The power curve's numbers, n = 2 .. 3n, every integer: they reach the page as its table view.
    const rows = [...html.matchAll(/<th scope="row"[^>]*>(\d+)<\/th>/g)].map((m) => Number(m[1]));
    expect(rows[0]).toBe(2);
    expect(rows.at(-1)).toBe(3 * Number(n));
    expect(rows).toHaveLength(3 * Number(n) - 1);
    expect(html).toContain(`With ${n} blades per arm (${2 * Number(n)} in all) you have an 80 % chance`);
  });

  it("a within-blade design counts blades: d_z = 0.5 needs 34 blades", async () => {
    // Source: from memory (no published table at hand): R's stats::power.t.test(delta = 0.5, sd = 1, power = 0.8,
    // type = "paired") gives n = 33.37 pairs for d_z = 0.5, two-sided alpha 0.05, which rounds up to 34.
    const { client, labId } = await signUp();
    const html = await (await client.get(page(labId, { design: "paired", unit: "gf", sd: "40", difference: "20", alpha: "0.05", power: "0.8" }))).text();
    expect(figure(html, "proposed-n")).toBe("34");
    expect(html).toContain("With 34 blades, each tested under both conditions");
    expect(html).toContain("20 gf");
  });

  it("a first visit plans with example values, and states the method and that n counts blades", async () => {
    const { client, labId } = await signUp();
    const response = await client.get(page(labId));
    expect(response.status).toBe(200);
    const html = await response.text();
    // Example: SD 30 cuts, difference 30 cuts, d = 1: 17 per group (Cohen 1988, table 2.4.1).
    expect(figure(html, "proposed-n")).toBe("17");
    expect(html).toContain("Example values");
    expect(html).toContain("noncentral t distribution");
    expect(html).toContain("so n counts blades, not runs");
    expect(html).toContain("Drawing the chart…");
    expect(html).toMatch(/method="get"/);
  });
});

describe("sample-size planner: bad input", () => {
  it("names each wrong field with status 400 and keeps the entered values", async () => {
    const { client, labId } = await signUp();
    const response = await client.get(page(labId, { design: "two-sample", unit: "cuts", sd: "-3", difference: "abc", alpha: "5", power: "1.2" }));
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("The SD must be above 0.");
    expect(html).toContain("Enter the smallest difference worth finding as a number");
    expect(html).toContain("Alpha must be at most 0.2");
    expect(html).toContain("Power must be at most 0.99");
    expect(html).toContain('value="abc"');
    expect(html).toContain('value="-3"');
    expect(html).not.toContain('data-testid="proposed-n"');
  });

  it("refuses a difference too small to plan for, on the difference field", async () => {
    const { client, labId } = await signUp();
    const response = await client.get(page(labId, { design: "two-sample", unit: "cuts", sd: "1000", difference: "0.01", alpha: "0.001", power: "0.99" }));
    expect(response.status).toBe(400);
    expect(await response.text()).toContain("more than 2,000 blades per arm would be needed");
  });

  it("never answers 500 to hostile or odd queries", async () => {
    const { client, labId } = await signUp();
    const base = "design=two-sample&unit=cuts&sd=30&difference=15&alpha=0.05&power=0.8";
    const queries = [
      "?foo=bar",
      "?design=three-arm&sd=30&difference=15&alpha=0.05&power=0.8",
      `?${base}&sd=31`,
      "?design=two-sample&sd=NaN&difference=Infinity&alpha=&power=0.8",
      "?design=two-sample&sd=1e999&difference=-0&alpha=0.0001&power=0.4",
      "?design=two-sample&unit=%3Cscript%3E&sd=30&difference=15&alpha=0.05&power=0.8",
      `?design=paired&sd=${"9".repeat(400)}&difference=1&alpha=0.05&power=0.8`,
      "?design=paired&sd=0x1F&difference=%00&alpha=0.05&power=0.8",
    ];
    for (const query of queries) {
      const response = await client.get(page(labId, query));
      expect(response.status, query).toBe(400);
      expect(await response.text(), query).toContain("Correct the marked fields");
    }
    // A decimal comma is read as a decimal point.
    const comma = await client.get(page(labId, "?design=two-sample&unit=cuts&sd=30&difference=15&alpha=0,05&power=0,8"));
    expect(comma.status).toBe(200);
    expect(figure(await comma.text(), "proposed-n")).toBe("64");
  });
});

describe("sample-size planner: who may open it", () => {
  it("owners and leads may; testers and analysts get 403", async () => {
    const { client: owner, labId } = await signUp();
    const { client: lead } = await addMember(owner, labId, "lead");
    const { client: tester } = await addMember(owner, labId, "tester");
    const { client: analyst } = await addMember(owner, labId, "analyst");
    expect((await owner.get(page(labId))).status).toBe(200);
    expect((await lead.get(page(labId))).status).toBe(200);
    expect((await tester.get(page(labId))).status).toBe(403);
    expect((await analyst.get(page(labId))).status).toBe(403);
    // The lab home links the planner for managers only.
    expect(await (await lead.get(`/labs/${labId}`)).text()).toContain(`/labs/${labId}/planning/sample-size`);
    expect(await (await tester.get(`/labs/${labId}`)).text()).not.toContain("/planning/sample-size");
  });

  it("a member of another lab gets 404", async () => {
    const { client: other } = await signUp("Other Owner");
    const { labId } = await signUp("This Owner");
    const response = await other.get(page(labId, { design: "two-sample", sd: "30", difference: "15", alpha: "0.05", power: "0.8" }));
    expect(response.status).toBe(404);
    expect(await response.text()).not.toContain("This Owner");
  });

  it("an anonymous visitor is sent to sign-in and back to the same plan", async () => {
    const { labId } = await signUp();
    const target = page(labId, { design: "two-sample", sd: "30", difference: "15", alpha: "0.05", power: "0.8" });
    const response = await new AppClient().get(target);
    expect(response.status).toBe(302);
    expect(response.headers.get("location")).toBe(`/sign-in?redirectTo=${encodeURIComponent(target)}`);
  });
});
