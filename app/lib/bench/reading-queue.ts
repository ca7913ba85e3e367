/**
 * The bench's outbox of readings: every value the tester enters is kept here, with its
 * client-made idempotency key, until the server confirms it. Pure functions over a plain
 * list, so the page can keep the list in localStorage (it survives a reload or a closed
 * tab) and the tests can drive time by hand.
 *
 * Sending is one at a time, oldest first, so readings reach the server in the order
 * they were taken. A failed send waits longer each time (1 s, 2 s, 4 s … up to 30 s);
 * a refusal by the server (4xx: the run ended, the value is out of range) is final and
 * shown, never retried.
 */

export type QueuedReading = {
  key: string;
  runId: string;
  attempt: number;
  cut: number;
  position: string;
  kind: "check" | "confirmation";
  value: number;
  status: "pending" | "failed" | "refused";
  tries: number;
  /** Epoch ms before which no new try is made. */
  notBefore: number;
  message: string | null;
  enteredAt: number;
};

export const BACKOFF_BASE_MS = 1000;
export const BACKOFF_MAX_MS = 30_000;

/** The wait after the n-th failed try (n >= 1): 1 s, 2 s, 4 s, … capped at 30 s. */
export function backoffDelay(tries: number): number {
  if (tries < 1) return 0;
  return Math.min(BACKOFF_MAX_MS, BACKOFF_BASE_MS * 2 ** (tries - 1));
}

export function enqueue(queue: readonly QueuedReading[], entry: Omit<QueuedReading, "status" | "tries" | "notBefore" | "message">): QueuedReading[] {
  if (queue.some((q) => q.key === entry.key)) return [...queue];
  return [...queue, { ...entry, status: "pending", tries: 0, notBefore: 0, message: null }];
}

/** The entry to send now: the oldest one still to be saved, if its wait is over; none while an older one waits. */
export function nextToSend(queue: readonly QueuedReading[], now: number): QueuedReading | null {
  const first = queue.find((q) => q.status !== "refused");
  if (!first) return null;
  return first.notBefore <= now ? first : null;
}

/** The server stored it (or had stored it already): it leaves the outbox. */
export function markSaved(queue: readonly QueuedReading[], key: string): QueuedReading[] {
  return queue.filter((q) => q.key !== key);
}

/** A network error or a server fault: try again later. */
export function markFailed(queue: readonly QueuedReading[], key: string, now: number, message: string): QueuedReading[] {
  return queue.map((q) => {
    if (q.key !== key) return q;
    const tries = q.tries + 1;
    return { ...q, status: "failed", tries, notBefore: now + backoffDelay(tries), message };
  });
}

/** The server refused the reading for good (4xx): kept on screen with the reason, not retried. */
export function markRefused(queue: readonly QueuedReading[], key: string, message: string): QueuedReading[] {
  return queue.map((q) => (q.key === key ? { ...q, status: "refused", message } : q));
}

/** The tester dismissed a refused reading. */
export function discard(queue: readonly QueuedReading[], key: string): QueuedReading[] {
  return queue.filter((q) => q.key !== key || q.status !== "refused");
}

/** "Try now": clears the waits, e.g. when the browser comes back online. */
export function retryNow(queue: readonly QueuedReading[]): QueuedReading[] {
  return queue.map((q) => (q.status === "failed" ? { ...q, notBefore: 0 } : q));
}

/** Drops entries the server already holds (after a reload, the page's saved readings say which). */
export function dropConfirmed(queue: readonly QueuedReading[], savedKeys: Iterable<string>): QueuedReading[] {
  const saved = new Set(savedKeys);
  return queue.filter((q) => !saved.has(q.key));
}

/**
 * How a response is to be taken: saved (2xx), refused for good (4xx), or to retry:
 * a network error, a server fault, 401 (signed out: kept until the tester signs in again),
 * 408 and 429.
 */
export function classifyResponse(status: number): "saved" | "refused" | "retry" {
  if (status >= 200 && status < 300) return "saved";
  if (status >= 400 && status < 500 && status !== 401 && status !== 408 && status !== 429) return "refused";
  return "retry";
}

export function storageKey(runId: string) {
  return `blindcut.bench.outbox.${runId}`;
}

/** Reads a stored outbox, dropping anything malformed rather than failing the page. */
export function parseStored(text: string | null, runId: string): QueuedReading[] {
  if (!text) return [];
  try {
    const data = JSON.parse(text) as unknown;
    if (!Array.isArray(data)) return [];
    return data.filter(
      (q): q is QueuedReading =>
        !!q &&
        typeof q === "object" &&
        typeof (q as QueuedReading).key === "string" &&
        (q as QueuedReading).runId === runId &&
        Number.isFinite((q as QueuedReading).value) &&
        Number.isInteger((q as QueuedReading).cut) &&
        typeof (q as QueuedReading).position === "string",
    );
  } catch {
    return [];
  }
}
