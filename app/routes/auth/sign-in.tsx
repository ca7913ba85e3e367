import { Form, Link, redirect, data, useSearchParams } from "react-router";
import type { Route } from "./+types/sign-in";
import { Field, FormAlert, PageTitle, SubmitButton } from "~/components/form.tsx";
import { authenticator, CLIENT_ADDRESS_HEADER, safeRedirect, SignInError } from "~/server/auth.server.ts";
import { createUserSession, getSessionUser } from "~/server/session.server.ts";
import { env } from "~/server/env.server.ts";
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from "~/server/demo/accounts.ts";
import { readFormData } from "~/server/form-data.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Blindcut" }];

export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  if (await getSessionUser(request)) throw redirect(safeRedirect(url.searchParams.get("redirectTo")));
  // Demo accounts are listed only when the app runs with demo data.
  const demo = env().BLINDCUT_DEMO_ACCOUNTS ? { accounts: DEMO_ACCOUNTS.map((a) => ({ email: a.email, role: a.role })), password: DEMO_PASSWORD } : null;
  return { demo };
}

export async function action({ request, context }: Route.ActionArgs) {
  // The body is read once, within the form limit; the strategy gets the parsed form.
  const form = await readFormData(request);
  const email = String(form.get("email") ?? "");
  try {
    const user = await authenticator.authenticate("form", new Request(request.url, {
        method: "POST",
        headers: { [CLIENT_ADDRESS_HEADER]: context?.clientAddress ?? "unknown" },
        body: new URLSearchParams(form as unknown as Record<string, string>),
      }));
    const cookie = await createUserSession(user.id);
    return redirect(safeRedirect(form.get("redirectTo")), { headers: { "Set-Cookie": cookie } });
  } catch (error) {
    if (error instanceof SignInError) {
      return data({ formError: error.message, errors: error.fieldErrors, values: { email } }, { status: 400 });
    }
    throw error;
  }
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const errors: Record<string, string> = actionData?.errors ?? {};
  return (
    <div className="mx-auto grid max-w-4xl gap-10 md:grid-cols-2">
      <div>
        <PageTitle>Sign in</PageTitle>
        <Form method="post" className="flex flex-col gap-4" noValidate>
          <FormAlert message={actionData?.formError} />
          <input type="hidden" name="redirectTo" value={params.get("redirectTo") ?? ""} />
          <Field label="E-mail" name="email" type="email" autoComplete="username" defaultValue={actionData?.values.email} error={errors.email} />
          <Field label="Password" name="password" type="password" autoComplete="current-password" error={errors.password} />
          <SubmitButton>Sign in</SubmitButton>
        </Form>
        <p className="mt-6 flex flex-col gap-2">
          <Link to="/forgot-password">Forgot your password?</Link>
          <span>
            New here? <Link to="/sign-up">Create a lab</Link>
          </span>
        </p>
      </div>
      {loaderData.demo ? (
        <aside className="rounded-lg border border-rule bg-card p-5" aria-labelledby="demo-accounts">
          <h2 id="demo-accounts" className="text-lg font-bold">Demo accounts (invented lab)</h2>
          <p className="mt-1 text-sm text-graphite-600">
            Every account uses the password <code className="figures font-bold">{loaderData.demo.password}</code>.
          </p>
          <table className="mt-3 w-full text-left text-sm">
            <thead>
              <tr>
                <th scope="col" className="py-1">E-mail</th>
                <th scope="col" className="py-1">Role</th>
              </tr>
            </thead>
            <tbody>
              {loaderData.demo.accounts.map((a) => (
                <tr key={a.email} className="border-t border-rule">
                  <td className="py-1 font-bold">{a.email}</td>
                  <td className="py-1">{a.role}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </aside>
      ) : null}
    </div>
  );
}
