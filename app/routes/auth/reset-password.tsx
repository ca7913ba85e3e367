import { Form, Link, data, redirect } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset-password";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { parseForm } from "~/lib/forms.ts";
import { completePasswordReset, PasswordSchema, resetTokenValid, UserFacingError } from "~/server/accounts.server.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Blindcut" }];

export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await resetTokenValid(params.token) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const parsed = parseForm(z.object({ password: PasswordSchema }), await readFormData(request));
  if (!parsed.ok) return data(parsed, { status: 400 });
  try {
    const { cookie } = await completePasswordReset(params.token, parsed.data.password);
    return redirect("/labs", { headers: { "Set-Cookie": cookie } });
  } catch (error) {
    if (error instanceof UserFacingError) return data({ ok: false as const, errors: {}, values: {}, formError: error.message }, { status: 410 });
    throw error;
  }
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  if (!loaderData.valid) {
    return (
      <div className="mx-auto max-w-md">
        <PageTitle>This link no longer works</PageTitle>
        <p>Reset links work once, for one hour. <Link to="/forgot-password">Ask for a new one</Link>.</p>
      </div>
    );
  }
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead="Every other signed-in session of your account ends when you save.">Choose a new password</PageTitle>
      <Form method="post" className="flex flex-col gap-4" noValidate>
        <FormAlert message={actionData?.formError} />
        <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} />
        <SubmitButton>Save the new password</SubmitButton>
      </Form>
    </div>
  );
}
