// The run's reading entry: typed values saved the moment they are entered, through the
// readings API with client-made idempotency keys; an outbox in localStorage keeps every
// value until the server confirms it. The screen shows the stop rule as the app applies
// it, and the server's decision.
import { useEffect, useMemo, useRef, useState } from "react";
import { useRevalidator } from "react-router";
import type { BenchRunView, ReadingJson, RunStateJson } from "~/server/bench/runs.server.ts";
import { CARD_POSITION, decideBenchRun, type BenchReading, type RunDecision } from "~/domain/bench/run-progress.ts";
import {
  classifyResponse,
  discard,
  dropConfirmed,
  enqueue,
  markFailed,
  markRefused,
  markSaved,
  nextToSend,
  parseStored,
  retryNow,
  storageKey,
  type QueuedReading,
} from "~/lib/bench/reading-queue.ts";
import { RunCurve } from "./run-curve.tsx";
import { BenchTools } from "./bench-tools.tsx";
import { newKey } from "~/lib/bench/keys.ts";


function mergeById(a: readonly ReadingJson[], b: readonly ReadingJson[]): ReadingJson[] {
  const map = new Map(a.map((r) => [r.id, r]));
  for (const r of b) map.set(r.id, r);
  return [...map.values()].sort((x, y) => (x.enteredAt < y.enteredAt ? -1 : x.enteredAt > y.enteredAt ? 1 : x.id < y.id ? -1 : 1));
}

/** A decimal as typed at the bench: "182", "182.5" or "182,5". */
export function parseTyped(text: string): number | null {
  const t = text.trim().replace(",", ".");
  if (!/^\d+(\.\d+)?$/.test(t)) return null;
  return Number(t);
}

type ServerView = { state: RunStateJson["state"]; stateWords: string; attempt: number; decision: RunDecision; needsSetup: boolean };

export function RunEntry({ labId, view }: { labId: string; view: BenchRunView }) {
  const { run, protocol } = view;
  const bench = protocol.bench;
  const isForce = bench.kind === "edge_force";
  const unit = isForce ? "gf" : "mm";
  const maxValue = bench.kind === "edge_force" ? bench.testerMaxGf : 1000;
  const apiBase = `/labs/${labId}/api/runs/${run.id}`;
  const revalidator = useRevalidator();
  const [saved, setSaved] = useState<ReadingJson[]>(view.readings);
  const [server, setServer] = useState<ServerView>({ state: run.state, stateWords: run.stateWords, attempt: run.attempt, decision: view.decision, needsSetup: run.needsSetup });
  const [outbox, setOutbox] = useState<QueuedReading[]>([]);
  const [restored, setRestored] = useState(false);
  const [inFlight, setInFlight] = useState<string | null>(null);
  const [now, setNow] = useState(() => Date.now());
  const [typed, setTyped] = useState("");
  const [typedError, setTypedError] = useState<string | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);
  const own = run.isOwnRun;

  useEffect(() => {
    setSaved((prev) => mergeById(prev, view.readings));
    setServer({ state: run.state, stateWords: run.stateWords, attempt: run.attempt, decision: view.decision, needsSetup: run.needsSetup });
  }, [view, run.state, run.stateWords, run.attempt, run.needsSetup]);

  // The outbox survives a reload: restore it, less what the server already holds.
  useEffect(() => {
    const stored = parseStored(window.localStorage.getItem(storageKey(run.id)), run.id);
    setOutbox(dropConfirmed(stored, view.readings.map((r) => r.idempotencyKey)));
    setRestored(true);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [run.id]);
  useEffect(() => {
    if (!restored) return;
    if (outbox.length) window.localStorage.setItem(storageKey(run.id), JSON.stringify(outbox));
    else window.localStorage.removeItem(storageKey(run.id));
  }, [outbox, restored, run.id]);
  useEffect(() => {
    const timer = window.setInterval(() => setNow(Date.now()), 500);
    const online = () => setOutbox((q) => retryNow(q));
    window.addEventListener("online", online);
    return () => {
      window.clearInterval(timer);
      window.removeEventListener("online", online);
    };
  }, []);

  function applyServer(body: RunStateJson) {
    setSaved((prev) => mergeById(prev, body.readings));
    setServer({ state: body.state, stateWords: body.stateWords, attempt: body.attempt, decision: body.decision, needsSetup: body.needsSetup });
    if (body.attempt !== run.attempt || body.state !== run.state || body.needsSetup !== run.needsSetup) revalidator.revalidate();
  }

  // One save at a time, oldest first.
  useEffect(() => {
    if (!restored || inFlight || !own) return;
    const entry = nextToSend(outbox, now);
    if (!entry) return;
    setInFlight(entry.key);
    (async () => {
      try {
        const res = await fetch(`${apiBase}/readings`, {
          method: "POST",
          headers: { "Content-Type": "application/json", Accept: "application/json" },
          body: JSON.stringify({ idempotencyKey: entry.key, attempt: entry.attempt, cut: entry.cut, position: entry.position, kind: entry.kind, value: entry.value }),
        });
        const body = (await res.json().catch(() => null)) as { reading?: ReadingJson; run?: RunStateJson; error?: string } | null;
        const outcome = classifyResponse(res.status);
        if (outcome === "saved" && body?.reading && body.run) {
          setOutbox((q) => markSaved(q, entry.key));
          applyServer(body.run);
        } else if (outcome === "refused") {
          setOutbox((q) => markRefused(q, entry.key, body?.error ?? `The server refused it (${res.status}).`));
        } else {
          setOutbox((q) => markFailed(q, entry.key, Date.now(), body?.error ?? `The server answered ${res.status}.`));
        }
      } catch {
        setOutbox((q) => markFailed(q, entry.key, Date.now(), "No connection."));
      } finally {
        setInFlight(null);
      }
    })();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [outbox, now, restored, inFlight, own]);

  const attemptSaved = saved.filter((r) => r.attempt === server.attempt);
  const waiting = outbox.filter((q) => q.status !== "refused" && q.attempt === server.attempt);
  const local: RunDecision = useMemo(() => {
    const list: BenchReading[] = [
      ...attemptSaved.map((r) => ({ id: r.id, cut: r.cut, position: r.position, kind: r.kind, value: r.value, supersedes: r.supersedesId })),
      ...waiting.map((q) => ({ id: q.key, cut: q.cut, position: q.position, kind: q.kind, value: q.value })),
    ];
    try {
      return decideBenchRun(bench, list);
    } catch {
      return server.decision;
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [saved, outbox, server]);

  const serverEnded = server.state !== "in_progress";
  const target =
    serverEnded || local.ended || local.nextCut === null
      ? null
      : local.status === "needs-confirmation"
        ? { cut: local.nextCut, position: "fresh spot", kind: "confirmation" as const, label: `Confirmation at a fresh spot · cut ${local.nextCut}` }
        : isForce
          ? { cut: local.nextCut, position: local.missingPositions[0], kind: "check" as const, label: `${local.nextCut === 0 ? "Baseline" : `Cut ${local.nextCut}`} · ${local.missingPositions[0]}` }
          : { cut: local.nextCut, position: CARD_POSITION, kind: "check" as const, label: `Stroke ${local.nextCut} · depth of card cut` };

  function submit(e: React.FormEvent) {
    e.preventDefault();
    if (!target) return;
    const value = parseTyped(typed);
    if (value === null) return setTypedError(`Type the reading as a number of ${unit}, e.g. 182 or 182.5`);
    if (value > maxValue) return setTypedError(`${value} ${unit} is above the instrument's maximum of ${maxValue} ${unit}: check the reading.`);
    setTypedError(null);
    setOutbox((q) => enqueue(q, { key: newKey(), runId: run.id, attempt: server.attempt, cut: target.cut, position: target.position, kind: target.kind, value, enteredAt: Date.now() }));
    setTyped("");
    inputRef.current?.focus();
  }

  const superseded = new Set(saved.map((r) => r.supersedesId).filter(Boolean) as string[]);
  const lastCheck = local.points.length ? local.points[local.points.length - 1].cut : null;
  const savedKeys = new Set(attemptSaved.map((r) => r.idempotencyKey));
  const uniqueRows: Row[] = [
    ...outbox
      .filter((q) => (q.status === "refused" || q.attempt === server.attempt) && !savedKeys.has(q.key))
      .map((q) => ({ key: q.key, cut: q.cut, position: q.position, kind: q.kind, value: q.value, status: q.status, message: q.message, notBefore: q.notBefore, reading: null })),
    ...attemptSaved.map((r) => ({ key: r.idempotencyKey, cut: r.cut, position: r.position, kind: r.kind, value: r.value, status: "saved" as const, message: null, notBefore: 0, reading: r })),
  ];
  uniqueRows.sort((a, b) => b.cut - a.cut);

  return (
    <div className="grid min-w-0 gap-6 lg:grid-cols-2">
      <section aria-labelledby="entry-title" className="flex min-w-0 flex-col gap-4">
        <h2 id="entry-title" className="sr-only">Readings</h2>
        <div className="rounded-lg border border-rule bg-card p-4" data-testid="cut-count">
          <p className="text-sm font-bold uppercase tracking-wide text-graphite-600">{isForce ? "Cut count" : "Stroke"}</p>
          <p className="figures text-display font-bold" data-testid="cut-count-value">
            {local.nextCut ?? server.decision.endCut ?? lastCheck ?? 0}
          </p>
          <p className="text-graphite-800">
            {isForce && lastCheck !== null ? `Last complete check: cut ${lastCheck}.` : isForce ? "No check yet." : `${local.points.length} of ${bench.kind === "card_depth" ? bench.strokeCount : 0} strokes recorded.`}
          </p>
        </div>

        <div
          className={`rounded-lg border-2 p-4 ${serverEnded ? "border-signal bg-signal-soft" : local.status === "needs-confirmation" ? "border-signal bg-signal-soft" : "border-ink bg-card"}`}
          data-testid="server-decision"
          data-status={server.decision.status}
          data-state={server.state}
          aria-live="polite"
        >
          <p className="text-sm font-bold uppercase tracking-wide text-graphite-600">The server's decision</p>
          <p className="text-xl font-bold">
            {serverEnded ? <span aria-hidden="true">■ </span> : null}
            {server.state === "withdrawn" ? "This run was withdrawn by a lead." : server.decision.message}
          </p>
          {!serverEnded && local.message !== server.decision.message ? (
            <p className="mt-2 text-graphite-800">
              <span className="font-bold">Next, as entered here:</span> {local.message}
            </p>
          ) : null}
          {server.decision.ahead > 0 ? <p className="mt-2 text-graphite-800">{server.decision.ahead} reading(s) saved ahead of an earlier check still being saved.</p> : null}
          {serverEnded ? (
            <p className="mt-3">
              <a href="/bench" className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline hover:bg-ink-deep">
                Back to my runs
              </a>
            </p>
          ) : null}
        </div>

        {own && target ? (
          <form onSubmit={submit} className="flex flex-col gap-2 rounded-lg border border-rule bg-card p-4" noValidate>
            <label htmlFor="reading-value" className="text-2xl font-bold" data-testid="entry-label">
              {target.label}
            </label>
            {target.kind === "confirmation" ? <p className="font-bold text-signal">▲ Move to a fresh spot of the edge that has not been read; do not cut further.</p> : null}
            <div className="flex flex-wrap items-stretch gap-2">
              <input
                ref={inputRef}
                id="reading-value"
                name="value"
                value={typed}
                onChange={(e) => setTyped(e.currentTarget.value)}
                inputMode="decimal"
                autoComplete="off"
                autoFocus
                aria-invalid={typedError ? true : undefined}
                aria-describedby={typedError ? "reading-error" : "reading-unit"}
                className="figures min-h-16 w-40 min-w-0 flex-1 rounded border-2 border-graphite-800 bg-paper px-3 text-4xl font-bold"
              />
              <span id="reading-unit" className="self-center text-xl text-graphite-600">
                {unit}
              </span>
              <button type="submit" className="min-h-16 min-w-28 rounded bg-ink px-5 text-xl font-bold text-white hover:bg-ink-deep">
                Save
              </button>
            </div>
            <p className="text-sm text-graphite-600">Type the value and press Enter: it is saved at once and the next position comes up.</p>
            {typedError ? (
              <p id="reading-error" role="alert" className="font-bold text-fault">
                ✕ {typedError}
              </p>
            ) : null}
          </form>
        ) : null}

        <div className="rounded-lg border border-rule bg-card p-4">
          <h3 className="mb-2 text-lg font-bold">
            Attempt {server.attempt}: readings{" "}
            <span className="font-normal text-graphite-600" data-testid="outbox-count">
              ({waiting.length ? `${waiting.length} not saved yet` : "all saved"})
            </span>
          </h3>
          {uniqueRows.length === 0 ? <p className="text-graphite-600">No readings yet.</p> : null}
          <ul className="flex flex-col divide-y divide-rule">
            {uniqueRows.map((r) => (
              <ReadingLine
                key={r.key}
                row={r}
                unit={unit}
                now={now}
                superseded={!!r.reading && superseded.has(r.reading.id)}
                canCorrect={own && !serverEnded && r.status === "saved" && !!r.reading && !superseded.has(r.reading.id)}
                apiBase={apiBase}
                onCorrected={(body) => applyServer(body)}
                onDiscard={() => setOutbox((q) => discard(q, r.key))}
              />
            ))}
          </ul>
        </div>
      </section>

      <section aria-labelledby="rule-title" className="flex min-w-0 flex-col gap-4">
        <RunCurve
          points={local.points}
          threshold={bench.kind === "edge_force" ? bench.force.threshold : null}
          cap={bench.kind === "edge_force" ? bench.force.cap : bench.strokeCount}
          unit={unit}
          label={`The run so far: ${local.points.length} ${isForce ? "checks" : "strokes"}`}
        />
        <div className="rounded-lg border border-rule bg-card p-4">
          <h2 id="rule-title" className="mb-1 text-lg font-bold">
            The stop rule
          </h2>
          <p className="text-graphite-800">{protocol.stopRule}</p>
          <p className="mt-2 text-sm text-graphite-600">The app applies it after every saved reading; the server decides when the run has ended.</p>
        </div>
        {own ? <BenchTools labId={labId} view={view} attempt={server.attempt} ended={serverEnded} lastCheck={lastCheck} onImported={() => revalidator.revalidate()} /> : null}
        {view.events.length ? (
          <div className="rounded-lg border border-rule bg-card p-4">
            <h3 className="mb-2 text-lg font-bold">Events</h3>
            <ul className="flex flex-col gap-2">
              {view.events.map((e) => (
                <li key={e.id} className="flex flex-wrap items-center gap-2">
                  <span className="font-bold">{EVENT_WORDS[e.kind] ?? e.kind}</span>
                  {e.cut !== null ? <span className="figures text-graphite-600">cut {e.cut}</span> : null}
                  <span className="text-graphite-600">attempt {e.attempt}</span>
                  {e.note ? <span>{e.note}</span> : null}
                  {e.photoUrl ? (
                    <a href={e.photoUrl} target="_blank" rel="noreferrer">
                      <img src={e.photoUrl} alt={`Edge photo at cut ${e.cut ?? "?"}`} className="h-16 w-16 rounded object-cover" />
                    </a>
                  ) : null}
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </section>
    </div>
  );
}

export const EVENT_WORDS: Record<string, string> = {
  chip: "Chip",
  rolled_edge: "Rolled edge",
  media_change: "Media change",
  other: "Other",
  deviation: "Deviation",
  failed_sharpening: "Failed sharpening",
  handed_over: "Handed over by the preparer",
  reassigned: "Reassigned by a lead",
  withdrawn: "Withdrawn by a lead",
};

type Row = { key: string; cut: number; position: string; kind: "check" | "confirmation"; value: number; status: "pending" | "failed" | "refused" | "saved"; message: string | null; notBefore: number; reading: ReadingJson | null };

function ReadingLine({ row, unit, now, superseded, canCorrect, apiBase, onCorrected, onDiscard }: { row: Row; unit: string; now: number; superseded: boolean; canCorrect: boolean; apiBase: string; onCorrected: (body: RunStateJson) => void; onDiscard: () => void }) {
  const [open, setOpen] = useState(false);
  const [value, setValue] = useState("");
  const [reason, setReason] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const status =
    row.status === "saved"
      ? { word: superseded ? "Corrected" : "Saved", shape: superseded ? "↺" : "✓", cls: superseded ? "text-graphite-600" : "text-ok" }
      : row.status === "pending"
        ? { word: "Saving…", shape: "…", cls: "text-ink" }
        : row.status === "failed"
          ? { word: `Not saved yet: retrying${row.notBefore > now ? ` in ${Math.ceil((row.notBefore - now) / 1000)} s` : ""}`, shape: "↻", cls: "text-signal" }
          : { word: `Refused: ${row.message ?? ""}`, shape: "✕", cls: "text-fault" };

  async function correct(e: React.FormEvent) {
    e.preventDefault();
    const v = parseTyped(value);
    if (v === null) return setError(`Type the corrected value as a number of ${unit}`);
    if (reason.trim().length < 3) return setError("Give a reason for the correction");
    setBusy(true);
    setError(null);
    try {
      const res = await fetch(`${apiBase}/corrections`, {
        method: "POST",
        headers: { "Content-Type": "application/json", Accept: "application/json" },
        body: JSON.stringify({ idempotencyKey: newKey(), readingId: row.reading!.id, value: v, reason: reason.trim() }),
      });
      const body = (await res.json().catch(() => null)) as { run?: RunStateJson; error?: string } | null;
      if (res.ok && body?.run) {
        setOpen(false);
        onCorrected(body.run);
      } else setError(body?.error ?? `The correction was not saved (${res.status}).`);
    } catch {
      setError("No connection: the correction was not saved. Try again.");
    } finally {
      setBusy(false);
    }
  }

  return (
    <li className="flex flex-col gap-2 py-2" data-testid="reading-line" data-status={row.status} data-cut={row.cut} data-position={row.position}>
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="figures w-16 text-graphite-600">{row.cut === 0 && row.kind === "check" ? "base" : `cut ${row.cut}`}</span>
        <span className="min-w-20">{row.kind === "confirmation" ? "confirmation" : row.position}</span>
        <span className={`figures text-2xl font-bold ${superseded ? "text-graphite-400 line-through" : ""}`}>
          {row.value} <span className="text-base font-normal text-graphite-600">{unit}</span>
        </span>
        <span className={`font-bold ${status.cls}`} data-testid="reading-status">
          <span aria-hidden="true">{status.shape} </span>
          {status.word}
        </span>
        {row.reading?.reason ? <span className="text-sm text-graphite-600">(correction: {row.reading.reason})</span> : null}
        {canCorrect ? (
          <button type="button" onClick={() => setOpen((o) => !o)} className="ml-auto min-h-target rounded border border-graphite-400 px-3 font-bold hover:bg-paper-deep">
            Correct
          </button>
        ) : null}
        {row.status === "refused" ? (
          <button type="button" onClick={onDiscard} className="ml-auto min-h-target rounded border border-graphite-400 px-3 font-bold hover:bg-paper-deep">
            Dismiss
          </button>
        ) : null}
      </div>
      {open ? (
        <form onSubmit={correct} className="flex flex-col gap-2 rounded border border-rule bg-paper p-3" noValidate>
          <p className="text-sm text-graphite-800">A correction is a new reading that replaces this one; both stay on the record with your reason.</p>
          <div className="flex flex-wrap gap-2">
            <label className="flex flex-col gap-1 font-bold">
              Corrected value ({unit})
              <input value={value} onChange={(e) => setValue(e.currentTarget.value)} inputMode="decimal" className="figures min-h-target w-32 rounded border border-graphite-400 bg-card px-2 text-xl" />
            </label>
            <label className="flex min-w-0 flex-1 flex-col gap-1 font-bold">
              Reason
              <input value={reason} onChange={(e) => setReason(e.currentTarget.value)} className="min-h-target rounded border border-graphite-400 bg-card px-2" />
            </label>
          </div>
          {error ? <p role="alert" className="font-bold text-fault">✕ {error}</p> : null}
          <div>
            <button type="submit" disabled={busy} className="min-h-target rounded bg-ink px-4 font-bold text-white disabled:opacity-60">
              {busy ? "Saving…" : "Save the correction"}
            </button>
          </div>
        </form>
      ) : null}
    </li>
  );
}
