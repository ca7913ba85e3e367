import { Form, Link, data, redirect, useParams } from "react-router";
import type { Route } from "./+types/invitation";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { parseForm } from "~/lib/forms.ts";
import { AcceptNewSchema, acceptInvitation, openInvitation, UserFacingError } from "~/server/accounts.server.ts";
import { getSessionUser } from "~/server/session.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Join a lab · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const opened = await openInvitation(params.token);
  if (!opened.ok) return { ok: false as const, reason: opened.reason };
  const user = await getSessionUser(request);
  return {
    ok: true as const,
    labName: opened.labName,
    role: opened.invitation.role,
    email: opened.invitation.email,
    mode: opened.existingUserId ? (user?.id === opened.existingUserId ? "accept" : "sign-in-first") : "new",
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const form = await readFormData(request);
  const user = await getSessionUser(request);
  try {
    if (form.get("intent") === "accept") {
      if (!user) throw redirect(`/sign-in?redirectTo=${encodeURIComponent(`/invitations/${params.token}`)}`);
      const result = await acceptInvitation(params.token, { userId: user.id });
      return redirect(`/labs/${result.labId}`, { headers: { "Set-Cookie": result.cookie } });
    }
    const parsed = parseForm(AcceptNewSchema, form);
    if (!parsed.ok) return data(parsed, { status: 400 });
    const result = await acceptInvitation(params.token, parsed.data);
    return redirect(`/labs/${result.labId}`, { headers: { "Set-Cookie": result.cookie } });
  } catch (error) {
    if (error instanceof UserFacingError) return data({ ok: false as const, errors: {}, values: {}, formError: error.message }, { status: error.status });
    throw error;
  }
}

export default function Invitation({ loaderData, actionData }: Route.ComponentProps) {
  const params = useParams();
  if (!loaderData.ok) {
    return (
      <div className="mx-auto max-w-md">
        <PageTitle>This invitation cannot be used</PageTitle>
        <p>{loaderData.reason}</p>
      </div>
    );
  }
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div className="mx-auto max-w-md">
      <PageTitle lead={`You are invited to ${loaderData.labName} as ${ROLE_LABELS[loaderData.role].article}.`}>Join {loaderData.labName}</PageTitle>
      <FormAlert message={actionData?.formError} />
      {loaderData.mode === "accept" ? (
        <Form method="post">
          <SubmitButton intent="accept">Join the lab</SubmitButton>
        </Form>
      ) : loaderData.mode === "sign-in-first" ? (
        <p>
          An account for {loaderData.email} already exists.{" "}
          <Link to={`/sign-in?redirectTo=${encodeURIComponent(`/invitations/${params.token}`)}`}>Sign in</Link>{" "}
          to accept the invitation.
        </p>
      ) : (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          <p>
            Your account will use the address <strong>{loaderData.email}</strong>.
          </p>
          <Field label="Your name" name="name" autoComplete="name" defaultValue={values.name} error={errors.name} />
          <Field label="Choose a password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} />
          <SubmitButton>Create my account and join</SubmitButton>
        </Form>
      )}
    </div>
  );
}
