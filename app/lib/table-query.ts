import { z } from "zod";

// Table state lives in the URL (shareable): search, filters, sort column and direction, page.

export type TableQuery<S extends string> = { q: string; sort: S; dir: "asc" | "desc"; page: number; pageSize: number; filters: Record<string, string> };

export function parseTableQuery<S extends string>(
  url: URL,
  sortable: readonly [S, ...S[]],
  defaults: { sort: S; dir?: "asc" | "desc"; pageSize?: number },
  filterNames: readonly string[] = [],
): TableQuery<S> {
  const p = url.searchParams;
  const sort = z.enum(sortable).catch(defaults.sort).parse(p.get("sort") ?? undefined);
  const dir = z.enum(["asc", "desc"]).catch(defaults.dir ?? "asc").parse(p.get("dir") ?? undefined);
  const page = z.coerce.number().int().min(1).max(100_000).catch(1).parse(p.get("page") ?? undefined);
  const q = (p.get("q") ?? "").trim().slice(0, 100);
  const filters: Record<string, string> = {};
  for (const name of filterNames) {
    const v = (p.get(name) ?? "").trim().slice(0, 100);
    if (v) filters[name] = v;
  }
  return { q, sort, dir, page, pageSize: defaults.pageSize ?? 25, filters };
}

/** The URL of the same table with some parameters changed (page resets unless given). */
export function tableHref(search: string, changes: Record<string, string | number | null>): string {
  const p = new URLSearchParams(search);
  if (!("page" in changes)) p.delete("page");
  for (const [k, v] of Object.entries(changes)) {
    if (v === null || v === "") p.delete(k);
    else p.set(k, String(v));
  }
  const s = p.toString();
  return s ? `?${s}` : "?";
}

/** Escapes % and _ so a search box finds what was typed, not a pattern. */
export function likePattern(q: string): string {
  return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}
