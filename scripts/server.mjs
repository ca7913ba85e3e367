// The production server: Express with the React Router request handler, so that
// security headers reach every response, static files included.
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import helmet from "helmet";
import { randomBytes } from "node:crypto";
import path from "node:path";
import { portTakenMessage } from "./ports.mjs";

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");
const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? "0.0.0.0";

// Mailed links are built from APP_URL in production (a local plain-http run uses its own origin).
if (process.env.NODE_ENV === "production" && !process.env.APP_URL && process.env.BLINDCUT_INSECURE_COOKIES !== "1") {
  console.error("[blindcut] APP_URL is required in production (the origin of links in mail)");
  process.exit(1);
}

const app = express();
app.disable("x-powered-by");
app.set("trust proxy", process.env.TRUST_PROXY === "1" ? 1 : false);
// A response sent before its request body was read (a 413, a 405) closes the connection: the
// unread rest of the body would otherwise be taken for the next request on a kept-alive socket.
app.use((req, res, next) => {
  const writeHead = res.writeHead;
  res.writeHead = function (...args) {
    if (!req.complete && !res.headersSent) res.setHeader("Connection", "close");
    return writeHead.apply(this, args);
  };
  next();
});

app.use((_req, res, next) => {
  res.locals.cspNonce = randomBytes(16).toString("base64");
  next();
});
app.use(
  helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'", (_req, res) => `'nonce-${res.locals.cspNonce}'`],
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", "data:", "blob:"],
        fontSrc: ["'self'"],
        connectSrc: ["'self'"],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
      },
    },
    referrerPolicy: { policy: "same-origin" },
    crossOriginEmbedderPolicy: false,
    // Local runs are plain http; HSTS only where TLS terminates in front of us.
    strictTransportSecurity: process.env.BLINDCUT_HSTS === "1",
  }),
);
app.use(compression());

// Writes from another site are refused: a form or fetch posted from a foreign page
// carries that page's Origin (or Sec-Fetch-Site: cross-site). SameSite=Lax cookies
// already stop most of it; this closes the rest.
const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);
const appOrigin = process.env.APP_URL ? new URL(process.env.APP_URL).origin : null;
app.use((req, res, next) => {
  if (SAFE_METHODS.has(req.method)) return next();
  const origin = req.get("origin");
  const expected = appOrigin ?? `${req.protocol}://${req.get("host")}`;
  const crossSite = origin ? origin !== expected : req.get("sec-fetch-site") === "cross-site";
  if (crossSite) {
    res.status(403).type("application/json").send(JSON.stringify({ error: "Requests from another site are refused." }));
    return;
  }
  next();
});
app.use("/assets", express.static(path.join(ROOT, "build/client/assets"), { immutable: true, maxAge: "1y" }));
app.use(express.static(path.join(ROOT, "build/client"), { maxAge: "1h" }));

const build = await import(path.join(ROOT, "build/server/index.js"));
// Methods no route handles are refused before routing (the same check the test client runs).
app.use((req, res, next) => {
  const refusal = build.entry.module.refuseRequest(req.method);
  if (!refusal) return next();
  res.status(refusal.status);
  refusal.headers.forEach((value, name) => res.setHeader(name, value));
  refusal.text().then((body) => res.send(body), next);
});
app.all(
  "*splat",
  createRequestHandler({
    build,
    mode: process.env.NODE_ENV,
    // req.ip is the socket address unless TRUST_PROXY=1 (then the nearest proxy's X-Forwarded-For entry).
    getLoadContext: (req, res) => ({ cspNonce: res.locals.cspNonce, clientAddress: req.ip ?? req.socket.remoteAddress ?? "unknown" }),
  }),
);

const server = app.listen(port, host, (err) => {
  if (err) {
    // A taken port is the user's to fix: one line naming it and the variable, no stack trace.
    if (err.code === "EADDRINUSE") console.error(`[blindcut] ${portTakenMessage({ service: "The app", port, host, variable: "PORT" })}`);
    else console.error(`[blindcut] The app cannot listen on ${host}:${port}: ${err.message}`);
    process.exit(2);
  }
  // Mailed links use APP_URL, else (outside production) this listening origin, never a request's Host.
  process.env.BLINDCUT_LISTEN_ORIGIN = `http://localhost:${server.address().port}`;
  console.log(`[blindcut] app listening on http://localhost:${port}`);
});
const shutdown = () => server.close(() => process.exit(0));
process.on("SIGTERM", shutdown);
process.on("SIGINT", shutdown);
