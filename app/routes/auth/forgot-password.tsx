import { Form, data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/forgot-password";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { parseForm } from "~/lib/forms.ts";
import { startPasswordReset, RESET_MINUTES } from "~/server/accounts.server.ts";
import { appUrl, composeMail, sendMail } from "~/server/mail.server.ts";
import { readFormData } from "~/server/form-data.server.ts";
import { allowResetRequest } from "~/server/throttle.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Blindcut" }];

const Schema = z.object({ email: z.string().trim().toLowerCase().email("Enter the e-mail address of your account") });

/** Looks the address up and mails the link; runs after the answer, so its time tells nothing. */
async function deliverReset(email: string) {
  const reset = await startPasswordReset(email);
  if (!reset) return;
  const url = appUrl(`/reset-password/${reset.token}`);
  await sendMail(
    composeMail(reset.user.email, "Reset your Blindcut password", [
      `Someone asked to reset the password of the Blindcut account for ${reset.user.email}.`,
      `The link works once, for ${RESET_MINUTES} minutes. If you did not ask for it, ignore this mail: your password stays as it is.`,
    ], { label: "Choose a new password", url }),
  );
}

export async function action({ request, context }: Route.ActionArgs) {
  const parsed = parseForm(Schema, await readFormData(request));
  if (!parsed.ok) return data({ ...parsed, sent: false }, { status: 400 });
  // Counted per address and per client before anything else; over the limit nothing is mailed.
  if (await allowResetRequest(parsed.data.email, context?.clientAddress ?? "unknown")) {
    void deliverReset(parsed.data.email).catch((error) => console.error("[blindcut] reset mail failed", error));
  }
  // The same answer, after the same work, whether or not the address has an account.
  return { sent: true, errors: {} as Record<string, string>, values: {} as Record<string, string> };
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead="We send a link to choose a new password.">Reset your password</PageTitle>
      {actionData?.sent ? (
        <FormAlert tone="ok" message="If that address has an account, a reset link is on its way. It works for one hour." />
      ) : (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={actionData?.values.email} error={actionData?.errors.email} />
          <SubmitButton>Send the link</SubmitButton>
        </Form>
      )}
    </div>
  );
}
