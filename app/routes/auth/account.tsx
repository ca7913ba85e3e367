import { Form, data } from "react-router";
import type { Route } from "./+types/account";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { requireUser } from "~/server/access.server.ts";
import { changePassword, ChangePasswordSchema, UserFacingError } from "~/server/accounts.server.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Your account · Blindcut" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { name: user.name, email: user.email };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const parsed = parseForm(ChangePasswordSchema, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
  try {
    await changePassword(user.id, user.sessionId, parsed.data);
    return { ok: true as const, errors: {}, values: {}, formError: undefined, done: "Password changed. Your other sessions have been signed out." };
  } catch (error) {
    if (error instanceof UserFacingError) {
      return data({ ok: false as const, errors: error.field ? { [error.field]: error.message } : {}, values: {}, formError: undefined, done: null }, { status: 400 });
    }
    throw error;
  }
}

export default function Account({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead={`${loaderData.name} · ${loaderData.email}`}>Your account</PageTitle>
      <h2 className="mb-3 text-xl font-bold">Change your password</h2>
      <Form method="post" className="flex flex-col gap-4" noValidate>
        <FormAlert tone="ok" message={actionData?.done ?? undefined} />
        <Field label="Current password" name="currentPassword" type="password" autoComplete="current-password" error={errors.currentPassword} />
        <Field label="New password" name="newPassword" type="password" autoComplete="new-password" hint="At least 10 characters. Your other sessions end when you save." error={errors.newPassword} />
        <SubmitButton>Change the password</SubmitButton>
      </Form>
    </div>
  );
}
