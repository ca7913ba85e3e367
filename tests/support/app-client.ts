// Sends requests through the app's real production build, in process, with a
// cookie jar per client: routing, sessions, loaders and actions all run for real.
import { createRequestHandler, type ServerBuild } from "react-router";
import path from "node:path";
import { pathToFileURL } from "node:url";

let handler: ((request: Request, clientAddress: string) => Promise<Response>) | undefined;
let clients = 0;

async function appHandler() {
  if (!handler) {
    const buildPath = path.resolve(import.meta.dirname, "../../build/server/index.js");
    const build = (await import(/* @vite-ignore */ pathToFileURL(buildPath).href)) as ServerBuild;
    const handle = createRequestHandler(build, "production");
    // The same pre-routing refusal as scripts/server.mjs.
    const refuseRequest = (build.entry.module as unknown as { refuseRequest?: (method: string) => Response | null }).refuseRequest ?? (() => null);
    handler = (request, clientAddress) => Promise.resolve(refuseRequest(request.method) ?? handle(request, { cspNonce: "test-nonce", clientAddress }));
  }
  return handler;
}

export const ORIGIN = "http://localhost";

export class AppClient {
  cookies = new Map<string, string>();
  /** The address the server sees for this client (each client its own unless a test shares one). */
  clientAddress = `192.0.2.${(clients++ % 250) + 1}:${process.env.VITEST_POOL_ID ?? 0}:${clients}`;

  constructor(options: { clientAddress?: string } = {}) {
    if (options.clientAddress) this.clientAddress = options.clientAddress;
  }

  async request(pathname: string, init: RequestInit = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set("Cookie", [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; "));
    if (init.method && init.method !== "GET" && !headers.has("Origin")) headers.set("Origin", ORIGIN);
    const response = await (await appHandler())(new Request(new URL(pathname, ORIGIN), { ...init, headers, redirect: "manual" }), this.clientAddress);
    for (const cookie of response.headers.getSetCookie()) {
      const [pair] = cookie.split(";");
      const [name, ...value] = pair.split("=");
      const expired = /max-age=0|expires=Thu, 01 Jan 1970/i.test(cookie);
      if (expired) this.cookies.delete(name.trim());
      else this.cookies.set(name.trim(), value.join("="));
    }
    return response;
  }

  get(pathname: string) {
    return this.request(pathname);
  }

  /** Posts a form as a browser would. */
  post(pathname: string, fields: Record<string, string | string[]>, headers: Record<string, string> = {}) {
    const body = new URLSearchParams();
    for (const [key, value] of Object.entries(fields)) {
      for (const v of Array.isArray(value) ? value : [value]) body.append(key, v);
    }
    return this.request(pathname, { method: "POST", body, headers: { "Content-Type": "application/x-www-form-urlencoded", ...headers } });
  }

  postJson(pathname: string, json: unknown, headers: Record<string, string> = {}) {
    return this.request(pathname, { method: "POST", body: JSON.stringify(json), headers: { "Content-Type": "application/json", ...headers } });
  }
}
