// Loads the invented demo lab. Idempotent: a second run finds it and does nothing.
// Never loaded in production unless BLINDCUT_DEMO=1 says so explicitly.
import { loadDemoData } from "../app/server/demo/load.server.ts";
import { closeDb } from "../app/server/db.server.ts";

if (process.env.NODE_ENV === "production" && process.env.BLINDCUT_DEMO !== "1") {
  console.log("[blindcut] production: demo data not loaded (set BLINDCUT_DEMO=1 to load it)");
} else {
  const result = await loadDemoData();
  console.log(`[blindcut] demo data ${result.created ? "loaded" : "already present"}`);
}
await closeDb();
