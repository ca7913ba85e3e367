import { Form, data } from "react-router";
import type { Route } from "./+types/settings";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { requireLabRole } from "~/server/access.server.ts";
import { labSettings, setLabTimeZone } from "~/server/lab-settings.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { knownTimeZones, LabSettingsSchema } from "~/lib/time-zone.ts";
import { formatDateTime } from "~/lib/dates.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Lab settings · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, ["owner"]);
  const settings = await labSettings(lab.id);
  return { lab, timeZone: settings.timeZone, zones: knownTimeZones(), now: new Date().toISOString() };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Only an owner sets the lab's time zone; the role is read from the database now.
  const { lab, user } = await requireLabRole(request, params.labId, ["owner"]);
  const parsed = parseForm(LabSettingsSchema, await readFormData(request));
  if (!parsed.ok) return data({ errors: parsed.errors, values: parsed.values, done: null }, { status: 400 });
  await setLabTimeZone(user.id, lab.id, parsed.data.timeZone);
  return { errors: {} as Record<string, string>, values: {} as Record<string, string>, done: `Time zone set to ${parsed.data.timeZone}.` };
}

export default function LabSettings({ loaderData, actionData }: Route.ComponentProps) {
  const { timeZone, zones, now } = loaderData;
  return (
    <div className="max-w-prose">
      <PageTitle lead="Dates and times on the lab's pages are shown in its time zone, with the zone beside each time. Stored times do not change.">
        Settings of {loaderData.lab.name}
      </PageTitle>
      <FormAlert tone="ok" message={actionData?.done ?? undefined} />
      <Form method="post" className="mt-4 flex flex-col gap-4" noValidate>
        <Field
          label="Time zone"
          name="timeZone"
          defaultValue={actionData?.values.timeZone ?? timeZone}
          error={actionData?.errors.timeZone}
          hint={`An IANA time zone such as Europe/Berlin or America/Chicago. Now: ${formatDateTime(now, timeZone)}.`}
          autoComplete="off"
          list="time-zones"
          required
        />
        <datalist id="time-zones">
          {zones.map((z) => <option key={z} value={z} />)}
        </datalist>
        <div><SubmitButton>Save the settings</SubmitButton></div>
      </Form>
      <p className="mt-4 text-sm text-graphite-600" data-testid="lab-time-zone">Current time zone: <strong>{timeZone}</strong></p>
    </div>
  );
}
