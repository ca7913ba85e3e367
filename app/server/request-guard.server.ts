/**
 * Checks every request before routing, in the production server and in the in-process
 * test client alike (both call it through the server build's entry module).
 *
 * Blindcut's routes answer GET (and HEAD) and POST only; React Router would run a
 * route's action for PUT, PATCH or DELETE as if it were POST, so those are refused here.
 */
export const HANDLED_METHODS = ["GET", "HEAD", "POST", "OPTIONS"] as const;

export function refuseRequest(method: string): Response | null {
  if ((HANDLED_METHODS as readonly string[]).includes(method.toUpperCase())) return null;
  return Response.json(
    { error: `The method ${method} is not allowed here: use GET or POST.` },
    { status: 405, headers: { Allow: "GET, HEAD, POST", "Cache-Control": "no-store" } },
  );
}
