import { describe, expect, it } from "vitest";
import { backoffDelay, classifyResponse, discard, dropConfirmed, enqueue, markFailed, markRefused, markSaved, nextToSend, parseStored, retryNow, type QueuedReading } from "~/lib/bench/reading-queue.ts";

const entry = (key: string, cut = 0) => ({ key, runId: "run-1", attempt: 1, cut, position: "heel", kind: "check" as const, value: 150, enteredAt: 0 });

describe("the bench outbox", () => {
  it("waits 1 s, 2 s, 4 s … after failures, capped at 30 s", () => {
    expect([0, 1, 2, 3, 4, 5, 6, 10].map(backoffDelay)).toEqual([0, 1000, 2000, 4000, 8000, 16000, 30000, 30000]);
  });

  it("sends oldest first, one at a time, and an older failed entry holds the later ones back until its wait is over", () => {
    let q: QueuedReading[] = [];
    q = enqueue(q, entry("a"));
    q = enqueue(q, entry("b"));
    q = enqueue(q, entry("a")); // the same key twice is one entry
    expect(q.map((x) => x.key)).toEqual(["a", "b"]);
    expect(nextToSend(q, 0)?.key).toBe("a");
    q = markFailed(q, "a", 1000, "No connection.");
    expect(q[0]).toMatchObject({ status: "failed", tries: 1, notBefore: 2000 });
    expect(nextToSend(q, 1500)).toBeNull();
    expect(nextToSend(q, 2000)?.key).toBe("a");
    q = markFailed(q, "a", 2000, "No connection.");
    expect(q[0].notBefore).toBe(4000);
    expect(nextToSend(retryNow(q), 2100)?.key).toBe("a");
    q = markSaved(q, "a");
    expect(nextToSend(q, 2100)?.key).toBe("b");
  });

  it("a refused entry is kept with its reason, skipped, and can be dismissed", () => {
    let q = enqueue(enqueue([], entry("a")), entry("b"));
    q = markRefused(q, "a", "The run has finished");
    expect(q[0]).toMatchObject({ status: "refused", message: "The run has finished" });
    expect(nextToSend(q, 0)?.key).toBe("b");
    expect(discard(q, "a").map((x) => x.key)).toEqual(["b"]);
    expect(discard(q, "b").map((x) => x.key)).toEqual(["a", "b"]); // only refused ones are dismissed
  });

  it("classifies responses: 2xx saved, 4xx refused, but 401/408/429 and 5xx retried", () => {
    expect([200, 201, 400, 404, 409, 401, 408, 429, 500, 503].map(classifyResponse)).toEqual(["saved", "saved", "refused", "refused", "refused", "retry", "retry", "retry", "retry", "retry"]);
  });

  it("survives a reload: stored entries come back, malformed ones and other runs' are dropped, confirmed ones leave", () => {
    const q = enqueue(enqueue([], entry("a")), entry("b", 2));
    const text = JSON.stringify([...q, { key: 5 }, { ...q[0], key: "c", runId: "other" }]);
    const back = parseStored(text, "run-1");
    expect(back.map((x) => x.key)).toEqual(["a", "b"]);
    expect(dropConfirmed(back, ["a"]).map((x) => x.key)).toEqual(["b"]);
    expect(parseStored("not json", "run-1")).toEqual([]);
    expect(parseStored(null, "run-1")).toEqual([]);
  });
});
