import { PassThrough } from "node:stream";
import type { AppLoadContext, EntryContext, ServerInstrumentation } from "react-router";
import { createReadableStreamFromReadable } from "@react-router/node";
import { ServerRouter } from "react-router";
import { isbot } from "isbot";
import { renderToPipeableStream, type RenderToPipeableStreamOptions } from "react-dom/server";
import { NonceContext } from "./nonce.tsx";
import { runInRequestScope } from "./server/request-scope.server.ts";

export const streamTimeout = 5_000;

// Every loader of one request runs inside one request scope, so the session is read once per page.
export const instrumentations: ServerInstrumentation[] = [
  {
    handler(handler) {
      handler.instrument({
        async request(handle, { request }) {
          await runInRequestScope(request.method, handle);
        },
      });
    },
  },
];

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: AppLoadContext,
) {
  const nonce = (loadContext as { cspNonce?: string } | undefined)?.cspNonce ?? "";
  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    // Crawlers and SPA mode get the whole document at once.
    const readyOption: keyof RenderToPipeableStreamOptions =
      (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";

    const { pipe, abort } = renderToPipeableStream(
      <NonceContext.Provider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceContext.Provider>,
      {
        nonce,
        [readyOption]() {
          shellRendered = true;
          const body = new PassThrough();
          const stream = createReadableStreamFromReadable(body);
          responseHeaders.set("Content-Type", "text/html; charset=utf-8");
          resolve(new Response(stream, { headers: responseHeaders, status: responseStatusCode }));
          pipe(body);
        },
        onShellError(error: unknown) {
          reject(error);
        },
        onError(error: unknown) {
          responseStatusCode = 500;
          if (shellRendered) console.error(error);
        },
      },
    );
    setTimeout(abort, streamTimeout + 1000);
  });
}

// The pre-routing checks, reached by the server (scripts/server.mjs) and the test client through build.entry.module.
export { refuseRequest } from "./server/request-guard.server.ts";
