import { data, Form, Link, useNavigation } from "react-router";
import { useEffect, useId, useState } from "react";
import type { Route } from "./+types/run";
import { FormAlert } from "~/components/form.tsx";
import { BenchCautions, BenchCautionStrip } from "~/components/bench/cautions.tsx";
import { RunStateBadge } from "~/components/bench/state-badge.tsx";
import { RunEntry } from "~/components/bench/run-entry.tsx";
import { BenchError } from "~/server/bench/api.server.ts";
import { benchRunView, confirmResharpening, requireBenchRun, ResharpenInput, setupChoices, SetupError, startRun, StartRunInput } from "~/server/bench/runs.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { normalizeBlindCode, validateBlindCode } from "~/domain/blind-codes.ts";
import { ordinal } from "~/domain/bench/run-progress.ts";
import { db } from "~/server/db.server.ts";
import { protocolVersions, runs, studies } from "~/server/db/schema/index.ts";
import { eq } from "drizzle-orm";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.view.run.blindCode ?? "Run"} · Bench · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: false });
  const view = await benchRunView(lab.id, runId, user.id);
  let choices: Awaited<ReturnType<typeof setupChoices>> | null = null;
  if (view.run.isOwnRun && view.run.state === "waiting") {
    const [row] = await db().select({ content: protocolVersions.content, kind: studies.kind }).from(runs).innerJoin(studies, eq(studies.id, runs.studyId)).innerJoin(protocolVersions, eq(protocolVersions.id, studies.protocolVersionId)).where(eq(runs.id, runId));
    choices = await setupChoices(lab.id, row.content, row.kind);
  }
  return { labId: lab.id, view, choices };
}

type ActionResult = { ok: boolean; errors: Record<string, string>; values: Record<string, string>; formError?: string; notice?: string };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, lab, runId } = await requireBenchRun(request, params.labId, params.runId, { write: false });
  const form = await readFormData(request);
  const intent = form.get("intent");
  const fail = (status: number, r: Partial<ActionResult>) => data<ActionResult>({ ok: false, errors: {}, values: {}, ...r }, { status });
  try {
    if (intent === "start") {
      const parsed = parseForm(StartRunInput, form);
      if (!parsed.ok) return fail(400, parsed);
      const started = await startRun(lab.id, runId, user.id, parsed.data);
      return data<ActionResult>({ ok: true, errors: {}, values: {}, notice: started.instrumentFlagged ? "Run started. The instrument is flagged (calibration): that is recorded with the run." : "Run started." });
    }
    if (intent === "resharpen") {
      const parsed = parseForm(ResharpenInput, form);
      if (!parsed.ok) return fail(400, parsed);
      await confirmResharpening(lab.id, runId, user.id, parsed.data);
      return data<ActionResult>({ ok: true, errors: {}, values: {}, notice: "Sharpening confirmed: take the new baseline." });
    }
    return fail(400, { formError: "Unknown action" });
  } catch (error) {
    const values: Record<string, string> = {};
    for (const [k, v] of form) if (typeof v === "string") values[k] = v;
    if (error instanceof SetupError) return fail(400, { errors: error.errors, values, formError: "Some items need your attention: see below." });
    if (error instanceof BenchError) return fail(error.status, { values, formError: error.message });
    throw error;
  }
}

export default function RunPage({ loaderData, actionData }: Route.ComponentProps) {
  const { view, choices, labId } = loaderData;
  const { run, study, protocol } = view;
  const result = actionData as ActionResult | undefined;
  return (
    <div className="flex min-w-0 flex-col gap-6">
      <header className="flex flex-col gap-2">
        <p className="text-graphite-600">
          <Link to="/bench">My runs</Link> · {study.shortName} · sitting <span className="figures">{run.sitting}</span> · schedule #<span className="figures">{run.schedulePosition}</span>
        </p>
        <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
          <h1 className="figures text-display font-bold tracking-wider" data-testid="run-code">
            {run.blindCode}
          </h1>
          <span className="text-xl text-graphite-800">{ordinal(run.bladeRunNumber)} run of this blade</span>
          <RunStateBadge state={run.state} words={run.stateWords} />
          {run.attempt > 1 ? <span className="rounded border border-signal px-2 py-0.5 font-bold text-signal">Attempt {run.attempt}</span> : null}
        </div>
        <p className="text-graphite-600">
          Protocol: {protocol.name}, version <span className="figures">{protocol.version}</span>
          {run.instrumentName ? ` · ${run.instrumentName}` : ""}
          {run.mediaLot ? ` · ${run.mediaLot}` : ""}
          {run.roomTempC !== null ? (
            <>
              {" "}· <span className="figures">{run.roomTempC}</span> °C, <span className="figures">{run.humidityPct}</span> % RH
            </>
          ) : null}
        </p>
        {run.instrumentFlagged ? (
          <p className="rounded border-l-4 border-signal bg-signal-soft p-3 font-bold" role="note">
            ▲ This run uses an instrument flagged by its calibration record. That is recorded with the run.
          </p>
        ) : null}
        <BenchCautionStrip />
        <FormAlert tone="ok" message={result?.ok ? result.notice : undefined} />
      </header>

      {!run.isOwnRun ? (
        <p className="rounded border border-rule bg-card p-3">You are viewing this run as a lead: only its tester records readings.</p>
      ) : null}

      {run.isOwnRun && run.state === "waiting" && choices ? (
        <SetupForm view={view} choices={choices} result={result} />
      ) : run.isOwnRun && run.needsSetup && run.state === "in_progress" ? (
        <ResharpenForm view={view} result={result} />
      ) : (
        <RunEntry key={`${run.id}:${run.attempt}`} labId={labId} view={view} />
      )}

      <BenchCautions />
    </div>
  );
}

type View = Route.ComponentProps["loaderData"]["view"];
type Choices = NonNullable<Route.ComponentProps["loaderData"]["choices"]>;

function FieldError({ id, message }: { id: string; message?: string }) {
  if (!message) return null;
  return (
    <p id={id} className="font-bold text-fault" role="alert">
      <span aria-hidden="true">✕ </span>
      {message}
    </p>
  );
}

function TickList({ name, items, legend, error, values }: { name: string; items: string[]; legend: string; error?: string; values?: string[] }) {
  const id = useId();
  return (
    <fieldset className="flex flex-col gap-2" aria-describedby={error ? `${id}-e` : undefined}>
      <legend className="mb-2 text-xl font-bold">{legend}</legend>
      {items.map((item, i) => (
        <label key={i} className="flex min-h-target cursor-pointer items-center gap-3 rounded border border-rule bg-card px-3 py-2 text-lg">
          <input type="checkbox" name={name} value={String(i)} defaultChecked={values?.includes(String(i))} className="h-7 w-7 shrink-0 accent-ink" />
          <span>{item}</span>
        </label>
      ))}
      <FieldError id={`${id}-e`} message={error} />
    </fieldset>
  );
}

function SetupForm({ view, choices, result }: { view: View; choices: Choices; result?: ActionResult }) {
  const { run, study, protocol } = view;
  const errors = result && !result.ok ? result.errors : {};
  const values = result && !result.ok ? result.values : {};
  const navigation = useNavigation();
  const busy = navigation.state === "submitting";
  const [code, setCode] = useState(values.blindCode ?? "");
  const [instrumentId, setInstrumentId] = useState(values.instrumentId ?? "");
  const codeCheck = code.trim() ? validateBlindCode(code) : null;
  const expected = normalizeBlindCode(run.blindCode);
  const codeMessage =
    codeCheck && !codeCheck.ok && normalizeBlindCode(code).length >= 6
      ? codeCheck.reason
      : codeCheck?.ok && codeCheck.code !== expected
        ? "That is a valid code, but of another blade: check that you picked up the blade whose label shows this run's code."
        : errors.blindCode;
  const codeOk = codeCheck?.ok && codeCheck.code === expected;
  const chosen = choices.instruments.find((i) => i.id === instrumentId);
  const ids = { code: useId(), lot: useId(), instrument: useId(), temp: useId(), humidity: useId(), reason: useId() };
  return (
    <Form method="post" className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="intent" value="start" />
      <h2 className="text-2xl font-bold">Before the first cut</h2>
      <FormAlert message={result && !result.ok ? result.formError : undefined} />
      {!run.isNext && run.nextRun ? (
        <div className="rounded border-l-4 border-signal bg-signal-soft p-3">
          <p className="font-bold">▲ This is not your next run in the schedule.</p>
          <p>
            Your next run is <Link to={`../${run.nextRun.id}`} relative="path" className="figures font-bold">{run.nextRun.blindCode}</Link>. To start this one
            instead, say why: it is recorded as a deviation.
          </p>
          <label htmlFor={ids.reason} className="mt-2 block font-bold">Reason for starting out of order</label>
          <textarea id={ids.reason} name="reason" defaultValue={values.reason} rows={2} className="mt-1 w-full rounded border border-graphite-400 bg-card p-2 text-lg" aria-invalid={errors.reason ? true : undefined} aria-describedby={errors.reason ? `${ids.reason}-e` : undefined} />
          <FieldError id={`${ids.reason}-e`} message={errors.reason} />
        </div>
      ) : null}

      <div className="flex flex-col gap-2">
        <label htmlFor={ids.code} className="text-xl font-bold">
          1. Blind code on the blade's label
        </label>
        <p className="text-graphite-600">Type it (or scan it) from the label on the blade you hold; letters in any case, with or without the hyphen.</p>
        <input
          id={ids.code}
          name="blindCode"
          value={code}
          onChange={(e) => setCode(e.currentTarget.value)}
          autoComplete="off"
          autoCapitalize="characters"
          spellCheck={false}
          className={`figures min-h-target w-full max-w-xs rounded border-2 bg-card px-3 text-3xl font-bold tracking-widest ${codeMessage ? "border-fault" : codeOk ? "border-ok" : "border-graphite-400"}`}
          aria-invalid={codeMessage ? true : undefined}
          aria-describedby={`${ids.code}-e`}
        />
        <div id={`${ids.code}-e`} aria-live="polite">
          {codeMessage ? (
            <p className="font-bold text-fault" data-testid="code-error">
              ✕ {codeMessage}
            </p>
          ) : codeOk ? (
            <p className="font-bold text-ok" data-testid="code-ok">✓ The code matches this run's blade.</p>
          ) : null}
        </div>
      </div>

      {study.hasPreparer ? (
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-2 text-xl font-bold">2. Hand-over from the preparer</legend>
          <p className="text-graphite-600">In this study the preparer sharpens every blade; you do not sharpen it.</p>
          {!run.handOverRecorded ? <p className="font-bold text-signal">▲ The preparer has not recorded the hand-over of this blade yet.</p> : null}
          <label className="flex min-h-target items-center gap-3 rounded border border-rule bg-card px-3 py-2 text-lg">
            <input type="checkbox" name="handOver" className="h-7 w-7 accent-ink" defaultChecked={values.handOver === "on"} />
            <span>The preparer handed this blade over, sharpened, under this code.</span>
          </label>
          <FieldError id="handover-e" message={errors.handOver} />
        </fieldset>
      ) : (
        <TickList name="sharpening" legend="2. Sharpening steps (tick each as you finish it)" items={protocol.sharpening} error={errors.sharpening} />
      )}

      <TickList name="safety" legend="3. Safety checklist" items={protocol.safetyChecklist} error={errors.safety} />

      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-xl font-bold">4. Media, instrument and room</legend>
        {/* min-w-0 and w-full: a long lot or instrument name wraps in the page instead of widening it on a phone. */}
        <div className="flex min-w-0 flex-col gap-1">
          <label htmlFor={ids.lot} className="font-bold">Media lot</label>
          <select id={ids.lot} name="mediaLotId" defaultValue={values.mediaLotId ?? ""} className="min-h-target w-full min-w-0 rounded border border-graphite-400 bg-card px-3 text-lg">
            <option value="">Choose…</option>
            {choices.lots.map((l) => (
              <option key={l.id} value={l.id} disabled={!!l.refusal}>
                {l.label}
                {l.refusal ? " (not accepted yet: reference runs missing)" : ""}
              </option>
            ))}
          </select>
          {choices.lots
            .filter((l) => l.refusal)
            .map((l) => (
              <p key={l.id} className="text-sm" data-testid="lot-refusal">▲ {l.refusal}</p>
            ))}
          {choices.lots.length === 0 ? <p className="text-signal">No lot of this protocol's medium is recorded: ask a lead to add one.</p> : null}
          <FieldError id={`${ids.lot}-e`} message={errors.mediaLotId} />
        </div>
        <div className="flex min-w-0 flex-col gap-1">
          <label htmlFor={ids.instrument} className="font-bold">Instrument</label>
          <select id={ids.instrument} name="instrumentId" value={instrumentId} onChange={(e) => setInstrumentId(e.currentTarget.value)} className="min-h-target w-full min-w-0 rounded border border-graphite-400 bg-card px-3 text-lg">
            <option value="">Choose…</option>
            {choices.instruments.map((i) => (
              <option key={i.id} value={i.id}>
                {i.name}
                {i.flagged ? " (flagged: calibration)" : ""}
              </option>
            ))}
          </select>
          {chosen?.flagged ? (
            <p className="rounded border-l-4 border-signal bg-signal-soft p-2 font-bold" data-testid="instrument-flagged">
              ▲ {chosen.state === "never_checked" ? "This instrument has never been checked." : chosen.state === "failed" ? "This instrument's last calibration check failed." : "This instrument's calibration has lapsed."} You may use it; the run records it as flagged.
            </p>
          ) : null}
          <FieldError id={`${ids.instrument}-e`} message={errors.instrumentId} />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor={ids.temp} className="font-bold">Room temperature <span className="font-normal text-graphite-600">(°C)</span></label>
          <input id={ids.temp} name="roomTempC" inputMode="decimal" defaultValue={values.roomTempC} className="figures min-h-target rounded border border-graphite-400 bg-card px-3 text-lg" />
          <FieldError id={`${ids.temp}-e`} message={errors.roomTempC} />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor={ids.humidity} className="font-bold">Relative humidity <span className="font-normal text-graphite-600">(%)</span></label>
          <input id={ids.humidity} name="humidityPct" inputMode="decimal" defaultValue={values.humidityPct} className="figures min-h-target rounded border border-graphite-400 bg-card px-3 text-lg" />
          <FieldError id={`${ids.humidity}-e`} message={errors.humidityPct} />
        </div>
      </fieldset>

      <div>
        <button type="submit" disabled={busy} className="min-h-target rounded bg-ink px-6 py-3 text-xl font-bold text-white hover:bg-ink-deep disabled:opacity-60">
          {busy ? "Starting…" : "Start the run"}
        </button>
      </div>
    </Form>
  );
}

function ResharpenForm({ view, result }: { view: View; result?: ActionResult }) {
  const { run, study, protocol } = view;
  const errors = result && !result.ok ? result.errors : {};
  const failed = view.events.filter((e) => e.kind === "failed_sharpening").pop();
  return (
    <Form method="post" className="flex flex-col gap-6" noValidate>
      <input type="hidden" name="intent" value="resharpen" />
      <div className="rounded border-l-4 border-signal bg-signal-soft p-4">
        <h2 className="text-2xl font-bold">▲ Failed sharpening: attempt {run.attempt} follows</h2>
        <p className="mt-1 text-lg">{failed?.note ?? "The baseline was at or above the threshold."} Re-sharpen the blade, then confirm below and take the new baseline.</p>
      </div>
      <FormAlert message={result && !result.ok ? result.formError : undefined} />
      {study.hasPreparer ? (
        <fieldset className="flex flex-col gap-2">
          <legend className="mb-2 text-xl font-bold">Hand-over from the preparer</legend>
          {!run.handOverRecorded ? <p className="font-bold text-signal">▲ The preparer has not recorded the new hand-over yet.</p> : null}
          <label className="flex min-h-target items-center gap-3 rounded border border-rule bg-card px-3 py-2 text-lg">
            <input type="checkbox" name="handOver" className="h-7 w-7 accent-ink" />
            <span>The preparer re-sharpened this blade and handed it over under this code.</span>
          </label>
          <FieldError id="handover-e" message={errors.handOver} />
        </fieldset>
      ) : (
        <TickList name="sharpening" legend="Sharpening steps (tick each as you finish it)" items={protocol.sharpening} error={errors.sharpening} />
      )}
      <TickList name="safety" legend="Safety checklist" items={protocol.safetyChecklist} error={errors.safety} />
      <div>
        <button type="submit" className="min-h-target rounded bg-ink px-6 py-3 text-xl font-bold text-white hover:bg-ink-deep">
          Confirm and take the new baseline
        </button>
      </div>
    </Form>
  );
}
