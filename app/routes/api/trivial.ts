// The benchmark's floor: a fixed short HTML page with no data, no session and no
// database, answered through the same Express server, middleware and React Router
// handler as every page. `npm run benchmark` divides the pages' throughput by this one's.
const PAGE = '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Blindcut</title></head><body><p>Blindcut</p></body></html>';

export function loader() {
  return new Response(PAGE, { headers: { "Content-Type": "text/html; charset=utf-8", "Cache-Control": "no-store" } });
}
