// The JavaScript each page loads first, from React Router's client manifest
// (build/client/assets/manifest-*.js): the client entry and its imports, the root route and
// the page's route module with their static imports, and the manifest itself. Lazy chunks
// (import() at run time, like the charts' library) are not part of a first load.
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { ROOT } from "./services.ts";

type Manifest = {
  entry: { module: string; imports?: string[] };
  routes: Record<string, { module: string; imports?: string[] }>;
};

const CLIENT = path.join(ROOT, "build/client");
// Strings only the charts' library (vega, vega-lite, vega-embed) carries; the app's own chart
// component only names the lazy chunk and the schema URL.
const VEGA_MARKERS = ["vega-embed", "Unrecognized signal name"];

export type FirstLoad = { label: string; routeId: string | null; files: number; rawBytes: number; gzipBytes: number; vegaFiles: string[] };

export function readManifest(): { manifest: Manifest; file: string } {
  const assets = path.join(CLIENT, "assets");
  const file = readdirSync(assets).find((f) => /^manifest-[\w-]+\.js$/.test(f));
  if (!file) throw new Error("no React Router client manifest in build/client/assets");
  const text = readFileSync(path.join(assets, file), "utf8");
  return { manifest: JSON.parse(text.slice(text.indexOf("=") + 1).trim().replace(/;$/, "")) as Manifest, file: `/assets/${file}` };
}

/** Every chunk of the build that contains the charts' library. */
export function vegaChunks(): string[] {
  const assets = path.join(CLIENT, "assets");
  return readdirSync(assets)
    .filter((f) => f.endsWith(".js"))
    .filter((f) => /vega-interpreter/.test(f) || VEGA_MARKERS.some((m) => readFileSync(path.join(assets, f), "utf8").includes(m)))
    .map((f) => `/assets/${f}`);
}

/** The first-load JavaScript of a page: entry, root and (when given) the page's route, with their static imports. */
export function firstLoad(label: string, routeId: string | null): FirstLoad {
  const { manifest, file } = readManifest();
  const files = new Set<string>([file, manifest.entry.module, ...(manifest.entry.imports ?? [])]);
  for (const id of ["root", ...(routeId ? [routeId] : [])]) {
    const route = manifest.routes[id];
    if (!route) throw new Error(`no route ${id} in the client manifest`);
    files.add(route.module);
    for (const i of route.imports ?? []) files.add(i);
  }
  const vega = new Set(vegaChunks());
  let rawBytes = 0;
  let gzipBytes = 0;
  for (const f of files) {
    const body = readFileSync(path.join(CLIENT, f));
    rawBytes += body.length;
    gzipBytes += gzipSync(body).length; // zlib's default level, as the server's compression middleware uses
  }
  return { label, routeId, files: files.size, rawBytes, gzipBytes, vegaFiles: [...files].filter((f) => vega.has(f)) };
}

export function gzipSizeOf(files: readonly string[]): number {
  return files.reduce((sum, f) => sum + gzipSync(readFileSync(path.join(CLIENT, f))).length, 0);
}
