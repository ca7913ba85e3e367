import { Form, Link, redirect, data } from "react-router";
import type { Route } from "./+types/sign-up";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { parseForm, formFailure } from "~/lib/forms.ts";
import { findUserByEmail, SignUpSchema, signUp, UserFacingError } from "~/server/accounts.server.ts";
import { appUrl, composeMail, sendMail } from "~/server/mail.server.ts";
import { getSessionUser } from "~/server/session.server.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Create a lab · Blindcut" }];

export async function loader({ request }: Route.LoaderArgs) {
  if (await getSessionUser(request)) throw redirect("/labs");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const form = await readFormData(request);
  const parsed = parseForm(SignUpSchema, form);
  if (!parsed.ok) return data(parsed, { status: 400 });
  try {
    const taken = await findUserByEmail(parsed.data.email);
    if (taken) {
      // The owner of the address hears about it; the page does not echo the password.
      void sendMail(
        composeMail(taken.email, "Someone tried to create a Blindcut account with your address", [
          "A new Blindcut lab was requested with this e-mail address, which already has an account. Nothing was created.",
          "If it was you, sign in instead, or reset your password if you forgot it. If it was not you, you can ignore this mail.",
        ], { label: "Sign in", url: appUrl("/sign-in") }),
      ).catch((error) => console.error("[blindcut] sign-up notice failed", error));
    }
    const { lab, cookie } = await signUp(parsed.data);
    return redirect(`/labs/${lab.id}`, { headers: { "Set-Cookie": cookie } });
  } catch (error) {
    if (error instanceof UserFacingError) {
      // The password is never sent back in page data.
      const { password: _password, ...kept } = parsed.data;
      return data(formFailure(kept as unknown as Record<string, string>, error.field ? { [error.field]: error.message } : {}, error.field ? undefined : error.message), { status: 400 });
    }
    throw error;
  }
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const errors = actionData?.errors ?? {};
  const values = actionData?.values ?? {};
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead="You become the lab's owner. Invite your leads, testers and analyst afterwards.">Create a lab</PageTitle>
      <Form method="post" className="flex flex-col gap-4" noValidate>
        <FormAlert message={actionData?.formError} />
        <Field label="Your name" name="name" autoComplete="name" defaultValue={values.name} error={errors.name} />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={values.email} error={errors.email} />
        <Field label="Password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} />
        <Field label="Lab name" name="labName" defaultValue={values.labName} error={errors.labName} />
        <SubmitButton>Create the lab</SubmitButton>
      </Form>
      <p className="mt-6">
        Already have an account? <Link to="/sign-in">Sign in</Link>
      </p>
    </div>
  );
}
