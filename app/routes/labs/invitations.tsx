import { Form, data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/invitations";
import { Field, FormAlert, PageTitle, SelectField, SubmitButton } from "~/components/form.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { createInvitation, invitableRoles, invitationsOfLab, InviteSchema, revokeInvitation, UserFacingError, INVITATION_DAYS } from "~/server/accounts.server.ts";
import { appUrl, composeMail, sendMail } from "~/server/mail.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Invitations · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab, roles: invitableRoles(role), invitations: await invitationsOfLab(lab.id) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { lab, role, user } = await requireLabRole(request, params.labId, MANAGERS);
  const form = await readFormData(request);
  try {
    if (form.get("intent") === "revoke") {
      const parsed = parseForm(z.object({ invitationId: z.string().uuid("Unknown invitation") }), form);
      if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
      await revokeInvitation({ id: user.id, role }, lab.id, parsed.data.invitationId);
      return { ok: true as const, errors: {}, values: {}, done: "Invitation revoked.", formError: undefined };
    }
    const parsed = parseForm(InviteSchema, form);
    if (!parsed.ok) return data({ ...parsed, done: null }, { status: 400 });
    const { token } = await createInvitation({ id: user.id, role }, lab.id, parsed.data);
    const url = appUrl(`/invitations/${token}`);
    await sendMail(
      composeMail(parsed.data.email, `You are invited to ${lab.name} on Blindcut`, [
        `${user.name} invites you to join ${lab.name} on Blindcut as ${ROLE_LABELS[parsed.data.role].article}.`,
        ROLE_LABELS[parsed.data.role].duty,
        `The link works once and expires in ${INVITATION_DAYS} days.`,
      ], { label: "Accept the invitation", url }),
    );
    return { ok: true as const, errors: {}, values: {}, done: `Invitation sent to ${parsed.data.email}.`, formError: undefined };
  } catch (error) {
    if (error instanceof UserFacingError) {
      const values = Object.fromEntries([...form].filter(([, v]) => typeof v === "string")) as Record<string, string>;
      return data({ ok: false as const, errors: error.field ? { [error.field]: error.message } : {}, values, done: null, formError: error.field ? undefined : error.message }, { status: error.status });
    }
    throw error;
  }
}

const stateLabel = { pending: "◷ Pending", accepted: "✓ Accepted", expired: "✕ Expired", revoked: "– Revoked" } as const;

export default function Invitations({ loaderData, actionData }: Route.ComponentProps) {
  const errors: Record<string, string> = actionData?.errors ?? {};
  const values: Record<string, string> = actionData?.values ?? {};
  return (
    <div className="grid gap-10 md:grid-cols-[2fr_3fr]">
      <section>
        <PageTitle lead="The person gets an e-mail with a link that works once, for 7 days.">Invite someone</PageTitle>
        {/* A new key after each sent invitation empties the form for the next one. */}
        <Form key={actionData?.done ?? "invite"} method="post" className="flex flex-col gap-4" noValidate>
          <FormAlert message={actionData?.formError} />
          <FormAlert tone="ok" message={actionData?.done ?? undefined} />
          <Field label="E-mail" name="email" type="email" defaultValue={values.email} error={errors.email} />
          <SelectField
            label="Role"
            name="role"
            defaultValue={values.role ?? "tester"}
            error={errors.role}
            options={loaderData.roles.map((r) => ({ value: r, label: `${ROLE_LABELS[r].name} — ${ROLE_LABELS[r].duty}` }))}
          />
          <SubmitButton intent="invite">Send the invitation</SubmitButton>
        </Form>
      </section>
      <section aria-labelledby="invitations-title">
        <h2 id="invitations-title" className="mb-3 text-xl font-bold">Invitations</h2>
        {loaderData.invitations.length === 0 ? (
          <p className="text-graphite-600">No invitations yet. Invite your testers and your analyst with the form.</p>
        ) : (
          <table className="w-full border-collapse text-left">
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className="py-2">E-mail</th>
                <th scope="col" className="py-2">Role</th>
                <th scope="col" className="py-2">State</th>
                <th scope="col" className="py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {loaderData.invitations.map((i) => (
                <tr key={i.id} className="border-b border-rule">
                  <td className="py-2">{i.email}</td>
                  <td className="py-2">{ROLE_LABELS[i.role].name}</td>
                  <td className="py-2" data-state={i.state}>{stateLabel[i.state]}</td>
                  <td className="py-2">
                    {i.state === "pending" ? (
                      <Form method="post">
                        <input type="hidden" name="invitationId" value={i.id} />
                        <button type="submit" name="intent" value="revoke" className="min-h-target rounded border border-fault px-3 font-bold text-fault">
                          Revoke
                        </button>
                      </Form>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
