import { AsyncLocalStorage } from "node:async_hooks";

// React Router hands every loader of one request its own copy of the Request, so a memo keyed
// by the Request object misses. The scope is entered once around the whole request handler
// (entry.server's instrumentation) and holds what the request has already read.
type Scope = Map<string, Promise<unknown>>;

const scope = new AsyncLocalStorage<Scope>();

/**
 * Runs one request's handler. Only reads (GET, HEAD) get a memo: a form POST runs its action
 * and then the loaders in one request, and those loaders must see what the action changed
 * (a role, a membership, a sign-out).
 */
export function runInRequestScope<T>(method: string, handle: () => T): T {
  return method === "GET" || method === "HEAD" ? scope.run(new Map(), handle) : handle();
}

/** The value `compute` gives, computed at most once per read request (every time outside one). */
export function oncePerRequest<T>(key: string, compute: () => Promise<T>): Promise<T> {
  const memo = scope.getStore();
  if (!memo) return compute();
  let found = memo.get(key) as Promise<T> | undefined;
  if (!found) {
    found = compute();
    memo.set(key, found);
  }
  return found;
}
