import { data } from "react-router";
import type { Route } from "./+types/mail";
import { PageTitle } from "~/components/form.tsx";
import { caughtMail } from "~/server/mail.server.ts";
import { env } from "~/server/env.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Caught mail (development) · Blindcut" }];

// Exists in development, and in local production builds only by an explicit switch.
export function loader() {
  const e = env();
  if (e.NODE_ENV === "production" && !e.BLINDCUT_DEV_MAIL) throw data("Not found", { status: 404 });
  return {
    mail: caughtMail()
      .slice(0, 100)
      .map((m) => ({ ...m, links: [...m.text.matchAll(/https?:\/\/\S+/g)].map((x) => x[0]) })),
  };
}

export default function DevMail({ loaderData }: Route.ComponentProps) {
  return (
    <div>
      <PageTitle lead="Every message sent by this local app is caught by the local SMTP server and listed here. This page does not exist in production.">
        Caught mail
      </PageTitle>
      {loaderData.mail.length === 0 ? <p>No mail yet.</p> : null}
      <ol className="flex flex-col gap-4">
        {loaderData.mail.map((m) => (
          <li key={m.id} className="rounded-lg border border-rule bg-card p-4">
            <p className="text-sm text-graphite-600">
              {new Date(m.receivedAt).toLocaleString("en-GB")} · to {m.to.join(", ")}
            </p>
            <h2 className="text-lg font-bold">{m.subject}</h2>
            <pre className="mt-2 whitespace-pre-wrap font-sans">{m.text}</pre>
            {m.links.map((l) => (
              <p key={l}>
                <a href={l}>{l}</a>
              </p>
            ))}
          </li>
        ))}
      </ol>
    </div>
  );
}
