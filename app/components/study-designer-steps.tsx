// The forms of the study designer's steps. Each step is one short form; saving it goes
// on to the next step, and every step can be opened again until the study is randomized.
import { Form, Link, useFetcher } from "react-router";
import { useEffect, useId, useMemo, useState } from "react";
import { Field, SubmitButton } from "./form.tsx";
import { EnrolmentBoard, LIBRARY, type BoardBox } from "./enrolment-board.tsx";
import { RecipeEditor } from "./recipe-editor.tsx";
import { stepInWords } from "~/domain/protocol.ts";
import { DESIGN_LABELS, OUTCOMES, STEP_IDS, STUDY_DESIGNS, STUDY_TESTS, outcomesFor, testsFor } from "~/lib/study-input.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";
import type { loader } from "~/routes/studies/design.tsx";

export type DesignData = Awaited<ReturnType<typeof loader>>;
type Result = { ok: true; message: string } | { ok: false; errors: Record<string, string>; values: Record<string, string>; formError?: string };

const SHOWN_TO_TESTERS = (
  <span className="ml-2 inline-flex items-center gap-1 rounded border border-signal px-1.5 text-xs font-bold text-signal">
    <span aria-hidden="true">◉</span> Shown to testers
  </span>
);

function TextArea({ label, name, defaultValue, error, hint, badge }: { label: string; name: string; defaultValue?: string; error?: string; hint?: string; badge?: React.ReactNode }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
        {badge}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-graphite-600">
          {hint}
        </p>
      ) : null}
      <textarea
        id={id}
        name={name}
        rows={3}
        defaultValue={defaultValue}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean).join(" ") || undefined}
        className={`rounded border bg-card p-3 text-base ${error ? "border-fault" : "border-graphite-400"}`}
      />
      {error ? (
        <p id={`${id}-error`} className="text-sm font-bold text-fault">
          <span aria-hidden="true">✕ </span>
          {error}
        </p>
      ) : null}
    </div>
  );
}

function ErrorText({ error }: { error?: string }) {
  return error ? (
    <p className="text-sm font-bold text-fault">
      <span aria-hidden="true">✕ </span>
      {error}
    </p>
  ) : null;
}

function Choice({ type, name, value, checked, disabled, title, text }: { type: "radio" | "checkbox"; name: string; value: string; checked: boolean; disabled?: boolean; title: string; text?: React.ReactNode }) {
  return (
    <label className={`flex min-h-target items-start gap-3 rounded border border-rule bg-card p-3 has-[:checked]:border-2 has-[:checked]:border-ink ${disabled ? "cursor-not-allowed opacity-70" : "cursor-pointer"}`}>
      <input type={type} name={name} value={value} defaultChecked={checked} disabled={disabled} className="mt-1 h-5 w-5 shrink-0 accent-ink" />
      <span>
        <span className="block font-bold">{title}</span>
        {text ? <span className="text-graphite-600">{text}</span> : null}
      </span>
    </label>
  );
}

function StepForm({ data, children, submit = "Save and continue" }: { data: DesignData; children: React.ReactNode; submit?: string }) {
  return (
    <Form method="post" noValidate className="flex max-w-3xl flex-col gap-5">
      <fieldset disabled={!data.editable} className="flex flex-col gap-5">
        {children}
        <div>
          <SubmitButton intent="save">{submit}</SubmitButton>
        </div>
      </fieldset>
    </Form>
  );
}

function NextLink({ data }: { data: DesignData }) {
  const i = STEP_IDS.indexOf(data.step);
  const to = i + 1 < STEP_IDS.length ? `design/${STEP_IDS[i + 1]}` : "randomize";
  return (
    <Link to={`/labs/${data.lab.id}/studies/${data.study.id}/${to}`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline hover:bg-ink-deep">
      Continue →
    </Link>
  );
}

function SampleSizeLink({ labId }: { labId: string }) {
  return (
    <p className="rounded border border-rule bg-card p-3">
      How many blades? <Link to={`/labs/${labId}/planning/sample-size`}>Plan the sample size</Link> from an assumed or pilot SD, the smallest difference worth finding, alpha and power.
    </p>
  );
}

export function DesignerStep({ data, result }: { data: DesignData; result?: Result }) {
  const errors = result && !result.ok ? result.errors : {};
  const values = result && !result.ok ? result.values : undefined;
  switch (data.step) {
    case "question":
      return <QuestionStep data={data} errors={errors} values={values} />;
    case "protocol":
      return <ProtocolStep data={data} errors={errors} />;
    case "outcomes":
      return <OutcomesStep data={data} errors={errors} />;
    case "arms":
      return <ArmsStep data={data} result={result} />;
    case "blades":
      return <BladesStep data={data} result={result} />;
    case "analysis":
      return <AnalysisStep data={data} errors={errors} values={values} />;
    case "people":
      return <PeopleStep data={data} errors={errors} />;
    case "randomization":
      return <RandomizationStep data={data} errors={errors} values={values} />;
  }
}

function QuestionStep({ data, errors, values }: { data: DesignData; errors: Record<string, string>; values?: Record<string, string> }) {
  const s = data.study;
  return (
    <StepForm data={data}>
      <p className="rounded border-l-4 border-signal bg-signal-soft p-3">
        <strong>The short name and the question are shown to testers</strong> at the bench and in their mail. Write them so they say nothing about the arms, the steels or which blade is which.
      </p>
      <div>
        <Field label="Short name (shown to testers)" name="shortName" defaultValue={values?.shortName ?? s.shortName} error={errors.shortName} hint="Printed on every label, e.g. “Temper study, spring”." />
      </div>
      <TextArea label="Question" name="question" badge={SHOWN_TO_TESTERS} defaultValue={values?.question ?? s.question} error={errors.question} hint="What the study asks, in one or two sentences." />
      <TextArea label="Hypothesis" name="hypothesis" defaultValue={values?.hypothesis ?? s.hypothesis} error={errors.hypothesis} hint="Not shown to testers. Frozen at randomization with the rest of the design." />
    </StepForm>
  );
}

function ProtocolStep({ data, errors }: { data: DesignData; errors: Record<string, string> }) {
  const enrolled = data.blades.filter((b) => b.place !== LIBRARY).length;
  if (data.published.length === 0) {
    return (
      <div className="max-w-3xl rounded border-l-4 border-signal bg-signal-soft p-3">
        <strong>The lab has no published protocol yet.</strong> A study runs on a published (frozen) protocol version. <Link to={`/labs/${data.lab.id}/protocols`}>Write and publish one</Link>, then come back.
      </div>
    );
  }
  return (
    <StepForm data={data}>
      <div className="flex flex-col gap-1">
        <label htmlFor="protocolVersionId" className="font-bold">
          Protocol version
        </label>
        <p className="text-sm text-graphite-600">Only published versions can be chosen: their content is frozen with its hash.</p>
        <select id="protocolVersionId" name="protocolVersionId" defaultValue={data.study.protocolVersionId ?? ""} className="min-h-target rounded border border-graphite-400 bg-card px-3">
          <option value="">Choose a published version…</option>
          {data.published.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label}
            </option>
          ))}
        </select>
        <ErrorText error={errors.protocolVersionId} />
      </div>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Design</legend>
        {STUDY_DESIGNS.map((d) => (
          <Choice key={d} type="radio" name="design" value={d} checked={data.study.design === d} title={DESIGN_LABELS[d].title} text={DESIGN_LABELS[d].text} />
        ))}
        <ErrorText error={errors.design} />
        {enrolled > 0 ? <p className="text-sm text-graphite-800">Changing the design takes the {enrolled} enrolled blade{enrolled === 1 ? "" : "s"} out of the study, and the analysis plan is set again.</p> : null}
      </fieldset>
      <SampleSizeLink labId={data.lab.id} />
    </StepForm>
  );
}

function OutcomesStep({ data, errors }: { data: DesignData; errors: Record<string, string> }) {
  if (!data.protocol) {
    return (
      <p className="max-w-3xl rounded border-l-4 border-signal bg-signal-soft p-3">
        Choose the protocol first: the outcomes depend on what it measures. <Link to={`/labs/${data.lab.id}/studies/${data.study.id}/design/protocol`}>Protocol and design</Link>
      </p>
    );
  }
  const options = outcomesFor(data.protocol.kind);
  return (
    <StepForm data={data}>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Primary outcome</legend>
        <p className="text-sm text-graphite-600">The one outcome the study's question is answered by; the analysis plan is about it.</p>
        {options.map((o) => (
          <Choice key={o} type="radio" name="primaryOutcome" value={o} checked={data.study.primaryOutcome === o} title={OUTCOMES[o].label} text={OUTCOMES[o].text} />
        ))}
        <ErrorText error={errors.primaryOutcome} />
      </fieldset>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Secondary outcomes</legend>
        <p className="text-sm text-graphite-600">Each is analysed like the primary in its own section, with no adjustment across outcomes: read as supportive.</p>
        {options.map((o) => (
          <Choice key={o} type="checkbox" name="secondaryOutcomes" value={o} checked={data.study.secondaryOutcomes.includes(o)} title={OUTCOMES[o].label} />
        ))}
        <ErrorText error={errors.secondaryOutcomes} />
      </fieldset>
    </StepForm>
  );
}

function ArmForm({ data, arm, result, index }: { data: DesignData; arm: DesignData["arms"][number] | null; result?: Result; index: number }) {
  const noun = DESIGN_LABELS[data.study.design].noun;
  const Noun = noun.charAt(0).toUpperCase() + noun.slice(1);
  const mine = result && !result.ok && (arm ? result.values.armId === arm.id : result.values.intent === "add-arm");
  const errors = mine && result && !result.ok ? result.errors : {};
  const values = mine && result && !result.ok ? result.values : undefined;
  const [mode, setMode] = useState<"protocol" | "own">((values?.recipeMode as "protocol" | "own") ?? (arm?.recipe ? "own" : "protocol"));
  const recipe = arm?.recipe ?? data.protocol?.sharpening ?? [];
  return (
    <Form method="post" noValidate className="flex flex-col gap-3 rounded-lg border border-rule bg-card p-4" aria-label={arm ? `${Noun} ${index + 1}: ${arm.name}` : `New ${noun}`}>
      <fieldset disabled={!data.editable} className="flex flex-col gap-3">
        {arm ? <input type="hidden" name="armId" value={arm.id} /> : null}
        <Field label={`${Noun} name`} name="name" defaultValue={values?.name ?? arm?.name ?? ""} error={errors.name} hint={arm ? undefined : `e.g. “${data.study.design === "parallel" ? "Tempered at 175 °C" : "Coarse finish"}”. Never shown to testers; they see neutral names.`} />
        <Field label="Description" name="description" defaultValue={values?.description ?? arm?.description ?? ""} error={errors.description} />
        <fieldset className="flex flex-col gap-2">
          <legend className="font-bold">Sharpening</legend>
          <label className="flex min-h-target items-center gap-2">
            <input type="radio" name="recipeMode" value="protocol" checked={mode === "protocol"} onChange={() => setMode("protocol")} className="h-5 w-5 accent-ink" />
            The protocol's recipe{data.protocol ? ` (${data.protocol.sharpening.length} steps)` : ""}
          </label>
          <label className="flex min-h-target items-center gap-2">
            <input type="radio" name="recipeMode" value="own" checked={mode === "own"} onChange={() => setMode("own")} className="h-5 w-5 accent-ink" />
            An own recipe for this {noun} (a preparer then sharpens)
          </label>
        </fieldset>
        {mode === "own" ? (
          <RecipeEditor listId={`recipe-${arm?.id ?? "new"}`} initial={recipe} errors={errors} />
        ) : data.protocol ? (
          <ol className="list-decimal pl-6 text-sm text-graphite-800">
            {data.protocol.sharpening.map((s, i) => (
              <li key={i}>{stepInWords(s)}</li>
            ))}
          </ol>
        ) : null}
        <div className="flex flex-wrap gap-3">
          <SubmitButton intent={arm ? "update-arm" : "add-arm"}>{arm ? `Save ${noun}` : `Add the ${noun}`}</SubmitButton>
        </div>
      </fieldset>
    </Form>
  );
}

function ArmsStep({ data, result }: { data: DesignData; result?: Result }) {
  const { noun, nouns } = DESIGN_LABELS[data.study.design];
  return (
    <div className="flex max-w-3xl flex-col gap-4">
      <p className="text-graphite-800">
        {data.study.design === "parallel"
          ? "Two or more arms, e.g. a steel and temper each. Each blade will go into one arm."
          : "Two or more conditions, e.g. edge finishes. Every blade is tested under every condition."}{" "}
        Names and descriptions are never shown to testers: they see neutral names (Arm A, Arm B…) drawn at randomization.
      </p>
      {data.arms.map((arm, i) => (
        <div key={arm.id} className="flex flex-col gap-2">
          <ArmForm data={data} arm={arm} result={result} index={i} />
          <Form method="post">
            <input type="hidden" name="armId" value={arm.id} />
            <fieldset disabled={!data.editable}>
              <SubmitButton intent="remove-arm" tone="danger">{`Remove “${arm.name}” (its blades leave the study)`}</SubmitButton>
            </fieldset>
          </Form>
        </div>
      ))}
      <h2 className="mt-4 text-xl font-bold">Add {data.arms.length === 0 ? `the first ${noun}` : `another ${noun}`}</h2>
      <ArmForm key={data.arms.length} data={data} arm={null} result={result} index={data.arms.length} />
      <p className="text-graphite-800">{data.arms.length} {nouns} so far; at least two are needed.</p>
      <div>
        <NextLink data={data} />
      </div>
    </div>
  );
}

function BladesStep({ data, result }: { data: DesignData; result?: Result }) {
  const fetcher = useFetcher<Result>();
  const parallel = data.study.design === "parallel";
  const [pending, setPending] = useState<Record<string, string>>({});
  useEffect(() => setPending({}), [data.blades]);
  useEffect(() => {
    if (fetcher.state === "idle" && fetcher.data && !fetcher.data.ok) setPending({});
  }, [fetcher.state, fetcher.data]);
  const boxes: BoardBox[] = useMemo(
    () => [
      { id: LIBRARY, title: "Library (not enrolled)", hint: "Retired and checked-out blades cannot be enrolled." },
      ...(parallel ? data.arms.map((a) => ({ id: a.id, title: `Arm: ${a.name}`, hint: a.description || undefined })) : [{ id: "study", title: "In the study", hint: "Each blade is tested under every condition." }]),
    ],
    [data.arms, parallel],
  );
  const blades = data.blades.map((b) => ({ ...b, place: pending[b.id] ?? b.place }));
  const onMove = (bladeId: string, to: string) => {
    setPending((p) => ({ ...p, [bladeId]: to }));
    if (to === LIBRARY) fetcher.submit({ intent: "unenrol", bladeId }, { method: "post" });
    else fetcher.submit({ intent: "move", bladeId, armId: to }, { method: "post" });
  };
  const fetchError = fetcher.state === "idle" && fetcher.data && !fetcher.data.ok ? fetcher.data.formError : undefined;
  const tableKey = data.blades.map((b) => b.place).join(",");
  const tableErrors = result && !result.ok ? result.errors : {};

  if (parallel && data.arms.length === 0) {
    return (
      <p className="max-w-3xl rounded border-l-4 border-signal bg-signal-soft p-3">
        Add the arms first: blades are enrolled into arms. <Link to={`/labs/${data.lab.id}/studies/${data.study.id}/design/arms`}>Arms or conditions</Link>
      </p>
    );
  }
  return (
    <div className="flex flex-col gap-6">
      <p className="max-w-3xl text-graphite-800">
        Drag blades from the library into {parallel ? "an arm" : "the study"}. With the keyboard: Tab to a blade's handle, Space to pick it up, the arrow keys to move it from box to box, Space to drop it. A blade can be in one arm of a study only. Or use the table below.
      </p>
      <div aria-live="polite">
        {fetchError ? (
          <p role="alert" className="rounded border-l-4 border-fault bg-fault-soft p-3 font-bold text-fault">
            {fetchError}
          </p>
        ) : null}
      </div>
      <EnrolmentBoard boxes={boxes} blades={blades} onMove={onMove} disabled={!data.editable} />
      <SampleSizeLink labId={data.lab.id} />

      <section aria-labelledby="enrolment-table">
        <h2 id="enrolment-table" className="text-xl font-bold">
          Enrolment as a table
        </h2>
        <p className="text-graphite-800">The same enrolment without dragging: choose where each blade goes, then save the table.</p>
        <Form method="post" key={tableKey} className="mt-2">
          <fieldset disabled={!data.editable}>
            <table className="w-full border-collapse text-left">
              <thead>
                <tr className="border-b-2 border-graphite-800">
                  <th scope="col" className="py-2 pr-3">Inventory number</th>
                  <th scope="col" className="py-2 pr-3">Blade</th>
                  <th scope="col" className="py-2 pr-3">Status</th>
                  <th scope="col" className="py-2">{parallel ? "Arm" : "Enrolment"}</th>
                </tr>
              </thead>
              <tbody>
                {data.blades.map((b) => {
                  const locked = b.refusal !== null && b.place === LIBRARY;
                  const error = tableErrors[`blade.${b.id}`];
                  return (
                    <tr key={b.id} className="border-b border-rule">
                      <th scope="row" className="figures py-2 pr-3">{b.inventoryNumber}</th>
                      <td className="py-2 pr-3 text-sm">{b.detail}</td>
                      <td className="py-2 pr-3 text-sm">
                        {b.status === "in_lab" ? "In the lab" : b.status === "out" ? "⊘ Checked out" : "⊘ Retired"}
                        {b.refusal ? <span className="block text-graphite-600">{b.refusal}</span> : null}
                      </td>
                      <td className="py-2">
                        <label className="sr-only" htmlFor={`enrol-${b.id}`}>
                          {parallel ? `Arm for blade ${b.inventoryNumber}` : `Enrolment of blade ${b.inventoryNumber}`}
                        </label>
                        <input type="hidden" name={`was.${b.id}`} value={b.place === LIBRARY ? "" : b.place} />
                        <select
                          id={`enrol-${b.id}`}
                          name={`blade.${b.id}`}
                          defaultValue={b.place === LIBRARY ? "" : b.place}
                          disabled={locked}
                          aria-invalid={error ? true : undefined}
                          className="min-h-target rounded border border-graphite-400 bg-card px-2 disabled:opacity-50"
                        >
                          <option value="">Not enrolled</option>
                          {parallel ? data.arms.map((a) => <option key={a.id} value={a.id}>{a.name}</option>) : <option value="study">In the study</option>}
                        </select>
                        <ErrorText error={error} />
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            <div className="mt-3">
              <SubmitButton intent="set-enrolment" tone="quiet">Save the table</SubmitButton>
            </div>
          </fieldset>
        </Form>
      </section>
      <div>
        <NextLink data={data} />
      </div>
    </div>
  );
}

function AnalysisStep({ data, errors, values }: { data: DesignData; errors: Record<string, string>; values?: Record<string, string> }) {
  const plan = data.study.analysisPlan;
  const tests = testsFor(data.study.design);
  const [comparisons, setComparisons] = useState<string>(values?.comparisons ?? plan?.comparisons ?? "all_pairs");
  const { noun } = DESIGN_LABELS[data.study.design];
  return (
    <StepForm data={data}>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Tests</legend>
        {tests.map((t) => (
          <Choice key={t} type="checkbox" name="tests" value={t} checked={plan ? plan.tests.includes(t) : true} title={STUDY_TESTS[t].label} />
        ))}
        <ErrorText error={errors.tests} />
      </fieldset>
      <div className="max-w-xs">
        <Field label="Alpha" name="alpha" defaultValue={values?.alpha ?? String(plan?.alpha ?? 0.05)} error={errors.alpha} inputMode="decimal" hint="Two-sided; 0.05 is usual. With more than two arms, Holm's adjustment keeps it across comparisons." />
      </div>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Comparisons</legend>
        <label className="flex min-h-target items-center gap-2">
          <input type="radio" name="comparisons" value="all_pairs" checked={comparisons === "all_pairs"} onChange={() => setComparisons("all_pairs")} className="h-5 w-5 accent-ink" /> Every pair
        </label>
        <label className="flex min-h-target items-center gap-2">
          <input type="radio" name="comparisons" value="vs_reference" checked={comparisons === "vs_reference"} onChange={() => setComparisons("vs_reference")} className="h-5 w-5 accent-ink" /> Each against a reference {noun}
        </label>
        <ErrorText error={errors.comparisons} />
      </fieldset>
      {comparisons === "vs_reference" ? (
        <div className="flex flex-col gap-1">
          <label htmlFor="referenceArmId" className="font-bold">
            Reference {noun}
          </label>
          <select id="referenceArmId" name="referenceArmId" defaultValue={values?.referenceArmId ?? plan?.referenceArmId ?? ""} className="min-h-target max-w-md rounded border border-graphite-400 bg-card px-3">
            <option value="">Choose…</option>
            {data.arms.map((a) => (
              <option key={a.id} value={a.id}>
                {a.name}
              </option>
            ))}
          </select>
          <ErrorText error={errors.referenceArmId} />
        </div>
      ) : null}
      <SampleSizeLink labId={data.lab.id} />
    </StepForm>
  );
}

function PeopleStep({ data, errors }: { data: DesignData; errors: Record<string, string> }) {
  const managers = data.members.filter((m) => m.role === "owner" || m.role === "lead");
  return (
    <StepForm data={data}>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Testers</legend>
        <p className="text-sm text-graphite-600">Only members with the tester role can test: owners and leads can open every key, so they cannot test blind.</p>
        {data.members.map((m) => (
          <Choice
            key={m.userId}
            type="checkbox"
            name="testerIds"
            value={m.userId}
            checked={data.testerIds.includes(m.userId)}
            disabled={m.refusal !== null && !data.testerIds.includes(m.userId)}
            title={`${m.name} (${ROLE_LABELS[m.role].name})`}
            text={m.refusal ?? m.email}
          />
        ))}
        <ErrorText error={errors.testerIds} />
      </fieldset>
      <div className="flex flex-col gap-1">
        <label htmlFor="preparerId" className="font-bold">
          Preparer {data.sharpeningDiffers ? "(required)" : "(optional)"}
        </label>
        <p className="text-sm text-graphite-600">
          {data.sharpeningDiffers
            ? "The arms or conditions differ in sharpening, so testers must not sharpen: an owner or lead sharpens each run's blade to its recipe and hands it over under its blind code."
            : "Every arm uses the protocol's recipe, so testers may sharpen. Name a preparer only if the lab wants one."}
        </p>
        <select id="preparerId" name="preparerId" defaultValue={data.study.preparerId ?? ""} aria-invalid={errors.preparerId ? true : undefined} className="min-h-target max-w-md rounded border border-graphite-400 bg-card px-3">
          <option value="">No preparer</option>
          {managers.map((m) => (
            <option key={m.userId} value={m.userId}>
              {m.name} ({ROLE_LABELS[m.role].name})
            </option>
          ))}
        </select>
        <ErrorText error={errors.preparerId} />
      </div>
    </StepForm>
  );
}

function RandomizationStep({ data, errors, values }: { data: DesignData; errors: Record<string, string>; values?: Record<string, string> }) {
  const r = data.study.randomization;
  const [method, setMethod] = useState<string>(values?.method ?? r?.method ?? "permuted_blocks");
  const k = data.arms.length;
  const unit = data.study.design === "parallel" ? k : k * (k % 2 === 0 ? k : 2 * k);
  const suggested = k >= 2 ? `${unit * (data.study.design === "parallel" ? 2 : 1)}` : "4";
  return (
    <StepForm data={data}>
      <fieldset className="flex flex-col gap-2">
        <legend className="mb-1 font-bold">Run order</legend>
        <label className="flex min-h-target items-start gap-2">
          <input type="radio" name="method" value="permuted_blocks" checked={method === "permuted_blocks"} onChange={() => setMethod("permuted_blocks")} className="mt-1 h-5 w-5 accent-ink" />
          <span>
            <strong>Permuted blocks</strong> — each block holds every {DESIGN_LABELS[data.study.design].noun} equally often, so the arms stay balanced through the study.
          </span>
        </label>
        <label className="flex min-h-target items-start gap-2">
          <input type="radio" name="method" value="complete" checked={method === "complete"} onChange={() => setMethod("complete")} className="mt-1 h-5 w-5 accent-ink" />
          <span>
            <strong>Complete randomization</strong> — every run order equally likely.
          </span>
        </label>
        <ErrorText error={errors.method} />
      </fieldset>
      {method === "permuted_blocks" ? (
        <div className="max-w-md">
          <Field
            label="Block sizes (runs)"
            name="blockSizes"
            defaultValue={values?.blockSizes ?? (r?.blockSizes.length ? r.blockSizes.join(", ") : suggested)}
            error={errors.blockSizes}
            hint={k >= 2 ? `Multiples of ${unit}${data.study.design === "parallel" ? ` (the number of arms)` : ""}. Give several, e.g. ${unit}, ${unit * 2}, so the next run cannot be guessed.` : "Multiples of the number of arms."}
          />
        </div>
      ) : (
        <input type="hidden" name="blockSizes" value="" />
      )}
      <label className="flex min-h-target items-start gap-2">
        <input type="checkbox" name="stratifyByTester" value="true" defaultChecked={r?.stratifyByTester ?? true} className="mt-1 h-5 w-5 accent-ink" />
        <span>
          <strong>Stratify by tester</strong> — each tester's runs are randomized (and blocked) on their own, so each tester gets every arm equally often.
        </span>
      </label>
      <div className="grid max-w-xl gap-4 sm:grid-cols-2">
        <Field label="Sitting length (runs)" name="sittingLength" defaultValue={values?.sittingLength ?? String(r?.sittingLength ?? 4)} error={errors.sittingLength} inputMode="numeric" hint="The most runs a tester does at one time." />
        <Field
          label="Replicates per blade"
          name="replicates"
          defaultValue={values?.replicates ?? String(r?.replicates ?? data.protocol?.replicates ?? 1)}
          error={errors.replicates}
          inputMode="numeric"
          hint={data.protocol ? `The protocol says ${data.protocol.replicates}.` : undefined}
        />
      </div>
    </StepForm>
  );
}
