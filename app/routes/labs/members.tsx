import { Form, Link, data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/members";
import { FormAlert, PageTitle } from "~/components/form.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { changeMemberRole, membersOfLab, removeMember, UserFacingError } from "~/server/accounts.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";
import { parseForm } from "~/lib/forms.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Members · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role, user } = await requireLabRole(request, params.labId, MANAGERS);
  return { lab, canManage: role === "owner", me: user.id, members: await membersOfLab(lab.id) };
}

const ActionSchema = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("change-role"), userId: z.string().uuid("Unknown member"), role: z.enum(["owner", "lead", "tester", "analyst"], { message: "Choose a role" }) }),
  z.object({ intent: z.literal("remove"), userId: z.string().uuid("Unknown member") }),
]);

export async function action({ request, params }: Route.ActionArgs) {
  // Only an owner changes roles or removes members; the role is read from the database now.
  const { lab, user } = await requireLabRole(request, params.labId, ["owner"]);
  const parsed = parseForm(ActionSchema, await readFormData(request));
  if (!parsed.ok) return data({ error: Object.values(parsed.errors)[0] ?? "Check the form", done: null }, { status: 400 });
  try {
    if (parsed.data.intent === "change-role") {
      await changeMemberRole(user.id, lab.id, parsed.data.userId, parsed.data.role);
      return { error: null, done: "Role changed." };
    }
    await removeMember(user.id, lab.id, parsed.data.userId);
    return { error: null, done: "Member removed." };
  } catch (error) {
    if (error instanceof UserFacingError) return data({ error: error.message, done: null }, { status: error.status });
    throw error;
  }
}

export default function Members({ loaderData, actionData }: Route.ComponentProps) {
  const { members, canManage } = loaderData;
  return (
    <div>
      <PageTitle lead={canManage ? "Change a member's role or remove them. Every change is recorded in the audit log." : "Only an owner can change roles."}>
        Members of {loaderData.lab.name}
      </PageTitle>
      <FormAlert message={actionData?.error ?? undefined} />
      <FormAlert tone="ok" message={actionData?.done ?? undefined} />
      {canManage ? <p><Link to={`/labs/${loaderData.lab.id}/settings`}>Lab settings: time zone</Link></p> : null}
      <table className="mt-4 w-full border-collapse text-left">
        <thead>
          <tr className="border-b-2 border-graphite-800">
            <th scope="col" className="py-2">Name</th>
            <th scope="col" className="py-2">E-mail</th>
            <th scope="col" className="py-2">Role</th>
            {canManage ? <th scope="col" className="py-2">Change</th> : null}
          </tr>
        </thead>
        <tbody>
          {members.map((m) => (
            <tr key={m.userId} className="border-b border-rule align-middle">
              <td className="py-2 font-bold">{m.name}</td>
              <td className="py-2">{m.email}</td>
              <td className="py-2">{ROLE_LABELS[m.role].name}</td>
              {canManage ? (
                <td className="flex flex-wrap gap-2 py-2">
                  <Form method="post" className="flex gap-2">
                    <input type="hidden" name="userId" value={m.userId} />
                    <label className="sr-only" htmlFor={`role-${m.userId}`}>Role of {m.name}</label>
                    <select id={`role-${m.userId}`} name="role" defaultValue={m.role} className="min-h-target rounded border border-graphite-400 bg-card px-2">
                      {(["owner", "lead", "tester", "analyst"] as const).map((r) => (
                        <option key={r} value={r}>{ROLE_LABELS[r].name}</option>
                      ))}
                    </select>
                    <button type="submit" name="intent" value="change-role" className="min-h-target rounded border border-graphite-400 px-3 font-bold">
                      Save role
                    </button>
                  </Form>
                  <Form method="post">
                    <input type="hidden" name="userId" value={m.userId} />
                    <button type="submit" name="intent" value="remove" className="min-h-target rounded border border-fault px-3 font-bold text-fault">
                      Remove{m.userId === loaderData.me ? " myself" : ""}
                    </button>
                  </Form>
                </td>
              ) : null}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
