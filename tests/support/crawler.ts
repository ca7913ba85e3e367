// A crawler over the app's real build: follows every same-site link of every page it
// reaches (and each page's loader data, `.data`), then requests every resource route
// with the ids it has seen. Collects every body so a test can look for leaks.
import { AppClient } from "./app-client.ts";
import { fillPattern, flattenRoutes } from "./routes.ts";

export type Crawled = { url: string; status: number; body: string };

const SKIP = [/^\/sign-out/, /^\/dev\//, /\.(png|jpg|svg|woff2?)$/];

export async function crawl(client: AppClient, starts: string[], options: { maxPages?: number; extraParams?: Record<string, string[]> } = {}) {
  const maxPages = options.maxPages ?? 400;
  const seen = new Set<string>();
  const queue = [...starts];
  const results: Crawled[] = [];
  const ids: Record<string, Set<string>> = {};
  const note = (name: string, value: string) => (ids[name] ??= new Set()).add(value);

  while (queue.length && results.length < maxPages) {
    const url = queue.shift()!;
    if (seen.has(url) || SKIP.some((r) => r.test(url))) continue;
    seen.add(url);
    const response = await client.get(url);
    const body = await response.text();
    results.push({ url, status: response.status, body });
    if (response.status >= 300 && response.status < 400) {
      const to = response.headers.get("location");
      if (to?.startsWith("/")) queue.push(to);
      continue;
    }
    if (!(response.headers.get("content-type") ?? "").includes("text/html")) continue;
    // Loader data travels separately from the HTML on client navigations: read it too.
    const dataUrl = `${url.split("?")[0].replace(/\/$/, "") || "/_root"}.data${url.includes("?") ? `?${url.split("?")[1]}` : ""}`;
    if (!seen.has(dataUrl)) {
      seen.add(dataUrl);
      const d = await client.get(dataUrl);
      results.push({ url: dataUrl, status: d.status, body: await d.text() });
    }
    for (const match of body.matchAll(/(?:href|action|src)="(\/[^"#]*)"/g)) {
      const link = match[1].replace(/&amp;/g, "&");
      if (!link.startsWith("/assets/") && !seen.has(link)) queue.push(link);
      for (const m of link.matchAll(/\/labs\/([0-9a-f-]{36})/g)) note("labId", m[1]);
      for (const m of link.matchAll(/\/runs\/([0-9a-f-]{36})/g)) note("runId", m[1]);
      for (const m of link.matchAll(/\/studies\/([0-9a-f-]{36})/g)) note("studyId", m[1]);
      for (const m of link.matchAll(/\/protocols\/([0-9a-f-]{36})/g)) note("protocolId", m[1]);
    }
  }

  // Every resource route (and page) with every combination of the ids seen or given.
  for (const [k, vs] of Object.entries(options.extraParams ?? {})) for (const v of vs) note(k, v);
  const values = Object.fromEntries(Object.entries(ids).map(([k, v]) => [k, [...v]]));
  for (const route of flattenRoutes()) {
    if (!route.params.every((p) => values[p]?.length || ["version", "step", "token", "fileId", "bladeId", "mediumId", "instrumentId"].includes(p))) continue;
    const combos = route.params.reduce<Record<string, string>[]>(
      (acc, p) => acc.flatMap((c) => (values[p] ?? [p === "version" ? "1" : p === "step" ? "question" : "00000000-0000-4000-8000-000000000000"]).map((v) => ({ ...c, [p]: v }))),
      [{}],
    );
    for (const c of combos.slice(0, 40)) {
      const url = fillPattern(route.pattern, c);
      if (seen.has(url) || SKIP.some((r) => r.test(url))) continue;
      seen.add(url);
      const response = await client.get(url);
      results.push({ url, status: response.status, body: await response.text() });
    }
  }
  return results;
}

export function findLeaks(pages: Crawled[], secrets: string[]) {
  const leaks: string[] = [];
  for (const p of pages) for (const s of secrets) if (s && p.body.includes(s)) leaks.push(`${p.url} (${p.status}) contains “${s}”`);
  return leaks;
}
