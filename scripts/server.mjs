// The production server: Express with the React Router request handler, so that
// security headers reach every response, static files included.
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import helmet from "helmet";
import { randomBytes } from "node:crypto";
import path from "node:path";

const ROOT = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..");
const port = Number(process.env.PORT ?? 3000);
const host = process.env.HOST ?? "0.0.0.0";

const app = express();
app.disable("x-powered-by");
app.set("trust proxy", process.env.TRUST_PROXY === "1" ? 1 : false);

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
app.use("/assets", express.static(path.join(ROOT, "build/client/assets"), { immutable: true, maxAge: "1y" }));
app.use(express.static(path.join(ROOT, "build/client"), { maxAge: "1h" }));

const build = await import(path.join(ROOT, "build/server/index.js"));
app.all(
  "*splat",
  createRequestHandler({
    build,
    mode: process.env.NODE_ENV,
    getLoadContext: (_req, res) => ({ cspNonce: res.locals.cspNonce }),
  }),
);

const server = app.listen(port, host, () => {
  console.log(`[blindcut] app listening on http://localhost:${port}`);
});
const shutdown = () => server.close(() => process.exit(0));
process.on("SIGTERM", shutdown);
process.on("SIGINT", shutdown);
