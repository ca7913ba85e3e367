// Simulated testers at the bench: each signed in with its own session and its own run in
// progress, saving readings one after another in the bench's JSON format with a key made by
// the client. Some readings are deliberately sent again with the same key (after the answer,
// or twice at once); a reading that got no answer is retried with its key until it is
// acknowledged, as the bench page's outbox does. Every loop is bounded in count and time.
import { randomUUID } from "node:crypto";
import { performance } from "node:perf_hooks";
import seedrandom from "seedrandom";
import type { AppServer } from "./services.ts";
import { withClient } from "./services.ts";
import { percentile, sleep } from "./stats.ts";

const POSITIONS = ["heel", "middle", "tip"] as const;
const POSITION_SHIFT = [8, 0, -6];
/** Share of readings sent twice at once, and sent again after their answer. */
export const CONCURRENT_REPEAT_SHARE = 0.05;
export const LATER_REPEAT_SHARE = 0.1;
const MAX_SENDS_PER_READING = 400;

type Body = { idempotencyKey: string; attempt: number; cut: number; position: string; kind: "check"; value: number };

export type Tester = {
  index: number;
  cookie: string;
  runId: string;
  /** Index of the next reading in the run's schedule (cut 0 heel, middle, tip, cut 1 heel, ...). */
  next: number;
  /** A reading sent but never acknowledged: sent again, same key, before any new one. */
  pending: Body | null;
  /** Every acknowledged key with the reading id the server answered. */
  acked: Map<string, string>;
  rng: () => number;
};

export function makeTester(index: number, cookie: string, runId: string): Tester {
  return { index, cookie, runId, next: 0, pending: null, acked: new Map(), rng: seedrandom(`benchmark-tester-${index}`) };
}

export type RoundStats = {
  seconds: number;
  newReadings: number;
  requests: number;
  latencies: number[];
  p50: number;
  p95: number;
  readingsPerSecond: number;
  requestsPerSecond: number;
  repeatsAfterAnswer: number;
  repeatsAtOnce: number;
  repeatMismatches: number;
  networkErrors: number;
  serverErrors: number;
  refusals: string[];
  gaveUp: number;
  /** Readings whose first answer was a replay: stored before the crash, answer lost, acknowledged on retry. */
  recoveredByReplay: number;
  crash: { killedAfterMs: number; inFlightAtKill: number; downMs: number } | null;
};

function readingFor(t: Tester, i: number): Body {
  const cut = Math.floor(i / POSITIONS.length);
  const p = i % POSITIONS.length;
  // Well below the 400 gf threshold, so every run stays in progress for the whole benchmark.
  const value = Math.round((150 + 1.5 * cut + POSITION_SHIFT[p] + 6 * (t.rng() - 0.5)) * 10) / 10;
  return { idempotencyKey: randomUUID(), attempt: 1, cut, position: POSITIONS[p], kind: "check", value };
}

class Round {
  readonly stats: RoundStats = {
    seconds: 0, newReadings: 0, requests: 0, latencies: [], p50: 0, p95: 0, readingsPerSecond: 0, requestsPerSecond: 0,
    repeatsAfterAnswer: 0, repeatsAtOnce: 0, repeatMismatches: 0, networkErrors: 0, serverErrors: 0, refusals: [], gaveUp: 0, recoveredByReplay: 0, crash: null,
  };
  inFlight = 0;

  constructor(private readonly origin: string, private readonly labId: string, readonly deadline: number) {}

  private async sendOnce(t: Tester, body: Body) {
    const started = performance.now();
    this.inFlight++;
    try {
      const response = await fetch(`${this.origin}/labs/${this.labId}/api/runs/${t.runId}/readings`, {
        method: "POST",
        headers: { "Content-Type": "application/json", Accept: "application/json", Origin: this.origin, Cookie: t.cookie },
        body: JSON.stringify(body),
      });
      const text = await response.text();
      let json: { reading?: { id: string; idempotencyKey: string }; error?: string } | null = null;
      try {
        json = JSON.parse(text);
      } catch {
        // not JSON: treated as a failed answer below
      }
      return { ok: true as const, status: response.status, json, ms: performance.now() - started };
    } catch {
      return { ok: false as const, ms: performance.now() - started };
    } finally {
      this.inFlight--;
    }
  }

  /** Sends one reading until the server acknowledges it (201 new, 200 replay), refuses it, or time runs out. */
  async sendUntilAcked(t: Tester, body: Body): Promise<{ id: string; status: number } | null> {
    for (let send = 0; send < MAX_SENDS_PER_READING; send++) {
      if (Date.now() > this.deadline) {
        this.stats.gaveUp++;
        return null;
      }
      const r = await this.sendOnce(t, body);
      if (!r.ok) {
        this.stats.networkErrors++;
        await sleep(50 * Math.min(send + 1, 4) + Math.random() * 50);
        continue;
      }
      this.stats.requests++;
      this.stats.latencies.push(r.ms);
      if ((r.status === 201 || r.status === 200) && r.json?.reading?.idempotencyKey === body.idempotencyKey) return { id: r.json.reading.id, status: r.status };
      if (r.status >= 500) {
        this.stats.serverErrors++;
        await sleep(50 * Math.min(send + 1, 4) + Math.random() * 50);
        continue;
      }
      this.stats.refusals.push(`${r.status} ${r.json?.error ?? ""}`.trim());
      return null;
    }
    this.stats.gaveUp++;
    return null;
  }

  async tester(t: Tester, count: number) {
    for (let k = 0; k < count; k++) {
      const body = t.pending ?? readingFor(t, t.next);
      t.pending = body;
      const roll = t.rng();
      let ack: { id: string; status: number } | null;
      if (roll < CONCURRENT_REPEAT_SHARE) {
        // The same reading sent twice at once (a double tap, two tabs): one row, one id.
        const [a, b] = await Promise.all([this.sendUntilAcked(t, body), this.sendUntilAcked(t, body)]);
        this.stats.repeatsAtOnce++;
        if (a && b && a.id !== b.id) this.stats.repeatMismatches++;
        ack = a ?? b;
      } else {
        ack = await this.sendUntilAcked(t, body);
        if (ack && ack.status === 200) this.stats.recoveredByReplay++;
        if (ack && roll < CONCURRENT_REPEAT_SHARE + LATER_REPEAT_SHARE) {
          // Sent again after its answer (a retry after a lost answer): the stored reading comes back.
          const again = await this.sendUntilAcked(t, body);
          this.stats.repeatsAfterAnswer++;
          if (!again || again.id !== ack.id || again.status !== 200) this.stats.repeatMismatches++;
        }
      }
      if (!ack) return;
      t.acked.set(body.idempotencyKey, ack.id);
      t.pending = null;
      t.next++;
      this.stats.newReadings++;
    }
  }

  finish(seconds: number): RoundStats {
    const s = this.stats;
    s.seconds = seconds;
    s.p50 = percentile(s.latencies, 50);
    s.p95 = percentile(s.latencies, 95);
    s.readingsPerSecond = s.newReadings / seconds;
    s.requestsPerSecond = s.requests / seconds;
    return s;
  }
}

/**
 * One round: every tester saves `perTester` new readings. With `crash`, the app server is
 * killed with SIGKILL `afterMs` into the round and started again at once on the same port.
 */
export async function readingsRound(testers: Tester[], origin: string, labId: string, perTester: number, options: { timeLimitMs: number; crash?: { afterMs: number; server: AppServer } }): Promise<RoundStats> {
  const round = new Round(origin, labId, Date.now() + options.timeLimitMs);
  const started = performance.now();
  let crashDone: Promise<void> = Promise.resolve();
  if (options.crash) {
    const { afterMs, server } = options.crash;
    crashDone = sleep(afterMs).then(async () => {
      const inFlight = round.inFlight;
      const killedAfterMs = performance.now() - started;
      await server.kill();
      const down = performance.now();
      await server.start();
      round.stats.crash = { killedAfterMs, inFlightAtKill: inFlight, downMs: performance.now() - down };
    });
  }
  await Promise.all(testers.map((t) => round.tester(t, perTester)));
  const seconds = (performance.now() - started) / 1000;
  await crashDone;
  return round.finish(seconds);
}

export type Verification = { acknowledged: number; stored: number; lost: number; idMismatches: number; doubledKeys: number; doubledSlots: number; storedUnacknowledged: number };

/**
 * Compares what the testers were told with what the database holds: every acknowledged key
 * stored once under the id the server answered, no reading stored twice (by key, or by
 * cut, position and kind within an attempt), and nothing stored that nobody was told about.
 */
export async function verifyReadings(databaseUrl: string, testers: readonly Tester[]): Promise<Verification> {
  const rows = await withClient(databaseUrl, async (c) =>
    (await c.query<{ run_id: string; idempotency_key: string; id: string; attempt: number; cut: number; position: string; kind: string; supersedes_id: string | null }>(
      "SELECT run_id, idempotency_key, id, attempt, cut, position, kind, supersedes_id FROM readings WHERE run_id = ANY($1::uuid[])",
      [testers.map((t) => t.runId)],
    )).rows,
  );
  const byKey = new Map<string, typeof rows>();
  const bySlot = new Map<string, number>();
  for (const r of rows) {
    const k = `${r.run_id}/${r.idempotency_key}`;
    byKey.set(k, [...(byKey.get(k) ?? []), r]);
    if (!r.supersedes_id) {
      const slot = `${r.run_id}/${r.attempt}/${r.cut}/${r.position}/${r.kind}`;
      bySlot.set(slot, (bySlot.get(slot) ?? 0) + 1);
    }
  }
  let acknowledged = 0;
  let lost = 0;
  let idMismatches = 0;
  const ackedKeys = new Set<string>();
  for (const t of testers) {
    for (const [key, id] of t.acked) {
      acknowledged++;
      ackedKeys.add(`${t.runId}/${key}`);
      const stored = byKey.get(`${t.runId}/${key}`);
      if (!stored) lost++;
      else if (stored[0].id !== id) idMismatches++;
    }
  }
  return {
    acknowledged,
    stored: rows.length,
    lost,
    idMismatches,
    doubledKeys: [...byKey.values()].filter((v) => v.length > 1).length,
    doubledSlots: [...bySlot.values()].filter((n) => n > 1).length,
    storedUnacknowledged: [...byKey.keys()].filter((k) => !ackedKeys.has(k)).length,
  };
}
