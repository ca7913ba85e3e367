import { Form, Link, data, useLocation } from "react-router";
import type { Route } from "./+types/sample-size";
import { Field, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { PowerCurveChart, percent } from "~/components/power-curve-chart.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import type { SampleSizePlan } from "~/domain/sample-size-plan.ts";
import type { FieldErrors } from "~/lib/forms.ts";
import { PLAN_DEFAULTS, PLAN_DESIGNS, PLAN_UNIT_ANALYSIS_UNIT, PLAN_UNITS, type PlanUnit, type SampleSizeForm } from "~/lib/sample-size-input.ts";
import { planFromQuery } from "~/server/sample-size.server.ts";
import { pilotSdOffersFor } from "~/server/analysis/pilot-sd.server.ts";
import type { PilotSdOffer } from "~/domain/pilot-sd.ts";

export const meta: Route.MetaFunction = () => [{ title: "Sample size · Blindcut" }];

/**
 * SDs measured in the lab's finished parallel studies, offered as the SD to plan with:
 * only studies whose primary outcome is in the unit being planned, the latest for each
 * outcome, with what the SD rests on.
 */
export type PilotSd = { unitKey: PlanUnit; offers: PilotSdOffer[] };

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const outcome = planFromQuery(new URL(request.url).searchParams);
  const unitKey = (Object.hasOwn(PLAN_UNITS, outcome.values.unit ?? "") ? outcome.values.unit : PLAN_DEFAULTS.unit) as PlanUnit;
  const pilotSd: PilotSd = { unitKey, offers: await pilotSdOffersFor(lab.id, PLAN_UNIT_ANALYSIS_UNIT[unitKey]) };
  if (!outcome.ok) return data({ lab, pilotSd, ...outcome, input: null, plan: null }, { status: 400 });
  return { lab, pilotSd, ...outcome, errors: {} as FieldErrors };
}

const fmt = (value: number, digits: number) => value.toLocaleString("en", { maximumFractionDigits: digits, minimumFractionDigits: 0 });
/** Power shown in words never overstates: rounded down to a whole percent. */
const wholePercentDown = (p: number) => `${Math.floor(p * 100 + 1e-9)} %`;
/** "an 80 % chance", "a 90 % chance": spoken numbers starting with a vowel sound (8, 11, 18) take "an". */
const withArticle = (text: string) => `${/^(8|11 |18 |11$|18$)/.test(text) ? "an" : "a"} ${text}`;

export default function SampleSize({ loaderData }: Route.ComponentProps) {
  const { lab, values, errors, plan, input, example, pilotSd } = loaderData;
  const location = useLocation();
  return (
    <div className="flex flex-col gap-8">
      <div>
        <p className="text-sm">
          <Link to={`/labs/${lab.id}`}>{lab.name}</Link> <span aria-hidden="true">›</span> Planning
        </p>
        <PageTitle lead="How many blades a study needs to find the smallest difference that matters, and how the chance of finding it grows with more blades.">
          Sample size
        </PageTitle>
      </div>
      <div className="grid gap-8 lg:grid-cols-[2fr_3fr]">
        <section aria-labelledby="plan-inputs">
          <h2 id="plan-inputs" className="mb-3 text-xl font-bold">What you assume</h2>
          {/* A GET form: the URL holds the plan, so it can be shared. The key remounts the inputs on back and forward. */}
          <Form key={location.search} method="get" className="flex flex-col gap-4" noValidate>
            <SelectField
              label="Design"
              name="design"
              defaultValue={values.design}
              error={errors.design}
              options={Object.entries(PLAN_DESIGNS).map(([value, d]) => ({ value, label: d.label }))}
            />
            <SelectField
              label="Outcome unit"
              name="unit"
              defaultValue={values.unit ?? PLAN_DEFAULTS.unit}
              error={errors.unit}
              options={Object.entries(PLAN_UNITS).map(([value, u]) => ({ value, label: u.label }))}
            />
            <Field
              label="Standard deviation"
              name="sd"
              inputMode="decimal"
              defaultValue={values.sd}
              error={errors.sd}
              hint="Assumed, or from a pilot, in the outcome's unit. Parallel arms: the SD of blade means within an arm. Within-blade: the SD of the within-blade differences."
            />
            <PilotSdOffer pilotSd={pilotSd} />
            <Field
              label="Smallest difference worth finding"
              name="difference"
              inputMode="decimal"
              defaultValue={values.difference}
              error={errors.difference}
              hint="In the same unit: the difference between arms (or conditions) that would change what the lab does."
            />
            <Field label="Alpha (two-sided)" name="alpha" inputMode="decimal" defaultValue={values.alpha} error={errors.alpha} hint="From 0.001 to 0.2; 0.05 is usual." />
            <Field label="Power" name="power" inputMode="decimal" defaultValue={values.power} error={errors.power} hint="The chance of finding the difference if it is real: from 0.5 to 0.99; 0.8 is usual." />
            <div>
              <SubmitButton>Plan the sample size</SubmitButton>
            </div>
          </Form>
        </section>
        <section aria-labelledby="plan-result" aria-live="polite">
          <h2 id="plan-result" className="mb-3 text-xl font-bold">What it takes</h2>
          {plan && input ? (
            <PlanResult plan={plan} input={input} example={example} />
          ) : (
            <p role="alert" className="rounded border-l-4 border-fault bg-fault-soft p-3 font-bold text-fault">
              Correct the marked fields to see the plan.
            </p>
          )}
        </section>
      </div>
      <MethodNote />
    </div>
  );
}

function PlanResult({ plan, input, example }: { plan: SampleSizePlan; input: SampleSizeForm; example: boolean }) {
  const counted = PLAN_DESIGNS[plan.design].counted;
  const unit = PLAN_UNITS[input.unit].short;
  const sentence =
    plan.design === "two-sample"
      ? `With ${plan.n} blades per arm (${2 * plan.n} in all) you have ${withArticle(wholePercentDown(plan.achievedPower))} chance of detecting a difference of ${fmt(input.difference, 6)} ${unit} between the two arms, if the SD of blade means is ${fmt(input.sd, 6)} ${unit} and the test is two-sided at alpha ${fmt(input.alpha, 4)}.`
      : `With ${plan.n} blades, each tested under both conditions, you have ${withArticle(wholePercentDown(plan.achievedPower))} chance of detecting a mean within-blade difference of ${fmt(input.difference, 6)} ${unit}, if the SD of the within-blade differences is ${fmt(input.sd, 6)} ${unit} and the test is two-sided at alpha ${fmt(input.alpha, 4)}.`;
  const description = `Line chart of the power of the test against the number of ${counted}, from ${plan.curve[0]?.n} to ${plan.curve[plan.curve.length - 1]?.n}. The power rises with n and crosses the target of ${percent(input.power, 0)} at ${plan.n} ${counted}, where it is ${percent(plan.achievedPower)}.`;
  return (
    <div className="flex flex-col gap-4">
      {example ? <p className="text-sm text-graphite-600">Example values: change them and plan again.</p> : null}
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3">
        <div className="rounded-lg border border-rule bg-card p-3">
          <dt className="text-sm font-bold text-graphite-600">Proposed {counted}</dt>
          <dd className="figures text-figure font-bold" data-testid="proposed-n">{plan.n}</dd>
        </div>
        <div className="rounded-lg border border-rule bg-card p-3">
          <dt className="text-sm font-bold text-graphite-600">Exact n, before rounding up</dt>
          <dd className="figures text-2xl font-bold" data-testid="exact-n">{plan.nExact.toFixed(2)}</dd>
        </div>
        <div className="rounded-lg border border-rule bg-card p-3">
          <dt className="text-sm font-bold text-graphite-600">Power at {plan.n}</dt>
          <dd className="figures text-2xl font-bold" data-testid="achieved-power">{percent(plan.achievedPower)}</dd>
        </div>
      </dl>
      <p className="max-w-prose text-lg" data-testid="plan-sentence">{sentence}</p>
      <p className="max-w-prose text-graphite-800">
        Standardized difference {plan.design === "two-sample" ? "d" : "dz"} = difference / SD ={" "}
        <span className="figures font-bold">{plan.effect.toFixed(3)}</span>.
        {plan.design === "two-sample" ? ` The study needs ${2 * plan.n} blades in all, half in each arm.` : null}
      </p>
      <PowerCurveChart
        curve={plan.curve}
        proposed={{ n: plan.n, power: plan.achievedPower }}
        target={input.power}
        counted={counted}
        description={description}
      />
    </div>
  );
}

/** The SDs finished studies of the lab measured in this unit, each offered with one click and with what it rests on. */
function PilotSdOffer({ pilotSd }: { pilotSd: PilotSd }) {
  const unit = PLAN_UNITS[pilotSd.unitKey];
  if (!pilotSd.offers.length) {
    return (
      <p className="text-sm text-graphite-600" data-testid="pilot-sd">
        No finished study to take an SD from with a primary outcome in {unit.short}: enter an assumed SD, or one measured in a pilot.
      </p>
    );
  }
  return (
    <ul className="flex flex-col gap-2 text-sm" data-testid="pilot-sd">
      {pilotSd.offers.map((o) => (
        <li key={o.outcome.key} data-testid="pilot-sd-offer">
          {o.studyName} measured an SD of <span className="figures font-bold">{fmt(o.sd, 3)} {o.outcome.unit}</span> for {o.outcome.label.toLowerCase()} (its primary outcome)
          {" "}over {o.blades} blades and {o.runs} runs, {o.replicatesPerBlade} replicate{o.replicatesPerBlade === 1 ? "" : "s"} per blade averaged (pooled over its arms, blade means as the unit), under
          {" "}{o.protocolName}, version {o.protocolVersion}; {fmtShare(o.censoredShare)} of runs censored.{" "}
          {o.replicatesPerBlade > 1 ? "A study with fewer replicates per blade will see a larger SD. " : null}
          {o.censoringWarning ? (
            <strong className="block text-fault" data-testid="pilot-sd-censoring"><span aria-hidden="true">▲ </span>{o.censoringWarning}</strong>
          ) : null}
          <Link to={`?design=two-sample&unit=${pilotSd.unitKey}&sd=${o.sd.toFixed(3)}`} className="font-bold">Plan with this SD</Link>
        </li>
      ))}
    </ul>
  );
}

const fmtShare = (share: number) => `${Math.round(share * 1000) / 10} %`;

function MethodNote() {
  return (
    <section aria-labelledby="plan-method" className="max-w-prose rounded-lg border border-rule bg-card p-4 text-graphite-800">
      <h2 id="plan-method" className="mb-2 text-lg font-bold text-graphite-950">How this is computed</h2>
      <p>
        Power of a two-sided t test at the chosen alpha, from the noncentral t distribution. Parallel arms: the two-sample t test
        with equal arms and equal SDs, df = 2n − 2 and noncentrality d·√(n/2) (the analysis uses Welch's t, which behaves
        nearly the same with equal arms). Within-blade: the paired t on
        within-blade differences, df = n − 1 and noncentrality dz·√n. The exact n is the real number at which the power equals
        the target; the proposal rounds it up, and the power shown is the power at that whole number.
      </p>
      <p className="mt-2">
        Replicates of one blade are averaged before arms are compared, so n counts blades, not runs. More replicates make each
        blade's mean steadier, which lowers the SD to plan with, but they do not add to n.
      </p>
      <p className="mt-2 text-sm text-graphite-600">
        References: J. Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, 2nd ed., chapter 2; R. V. Lenth
        (1989), Algorithm AS 243, cumulative distribution function of the non-central t distribution.
      </p>
    </section>
  );
}
