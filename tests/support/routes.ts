// Every route of app/routes.ts, flattened, with a way to fill its path parameters.
import routes from "../../app/routes.ts";

type Entry = { path?: string; file: string; index?: boolean; children?: Entry[] };

export type FlatRoute = { pattern: string; file: string; params: string[] };

export function flattenRoutes(): FlatRoute[] {
  const out: FlatRoute[] = [];
  const walk = (entries: Entry[], parent: string) => {
    for (const e of entries) {
      const path = e.index ? parent : [parent, e.path].filter(Boolean).join("/");
      if (e.children) walk(e.children, path);
      out.push({ pattern: `/${path}`.replace(/\/+/g, "/").replace(/(.)\/$/, "$1"), file: e.file, params: [...`/${path}`.matchAll(/:(\w+)/g)].map((m) => m[1]) });
    }
  };
  walk(routes as unknown as Entry[], "");
  return out;
}

export function fillPattern(pattern: string, values: Record<string, string>): string {
  return pattern.replace(/:(\w+)/g, (_, name: string) => {
    const v = values[name];
    if (v === undefined) throw new Error(`no value for the route parameter :${name} in ${pattern}: add one to the test's parameter table`);
    return encodeURIComponent(v);
  }).replace("*", "no-such-page");
}

/** What a response means for access: allowed, sign-in redirect, or the status. */
export function accessOutcome(response: Response): string {
  const s = response.status;
  if (s >= 300 && s < 400) {
    const to = response.headers.get("location") ?? "";
    return to.startsWith("/sign-in") ? "signin" : "redirect";
  }
  if (s >= 200 && s < 300) return "allowed";
  return String(s);
}
