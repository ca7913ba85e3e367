import { checkDatabase } from "~/server/health.server.ts";

// For load balancers and monitoring: 200 when the database answers, 503 when it does not.
export async function loader() {
  const database = await checkDatabase();
  const body = { status: database.ok ? "ok" : "unavailable", database, at: new Date().toISOString() };
  return Response.json(body, { status: database.ok ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}
