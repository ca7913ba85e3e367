import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration, useRouteLoaderData } from "react-router";
import "@fontsource/atkinson-hyperlegible/400.css";
import "@fontsource/atkinson-hyperlegible/700.css";
import "./styles/app.css";
import type { Route } from "./+types/root";
import { useNonce } from "./nonce.tsx";
import { AppShell } from "./components/app-shell.tsx";
import { ErrorPage } from "./components/error-page.tsx";
import { getOptionalShellUser } from "./server/shell.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Blindcut" }];

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  return { user: await getOptionalShellUser(request, params.labId) };
}

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user}>
      <Outlet />
    </AppShell>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const data = useRouteLoaderData<typeof loader>("root");
  let status = 500;
  let detail: string | undefined;
  let stack: string | undefined;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    detail = typeof error.data === "string" ? error.data : undefined;
  } else if (import.meta.env.DEV && error instanceof Error) {
    // The stack is shown in development only: it can reveal internals.
    detail = error.message;
    stack = error.stack;
  }
  return (
    <AppShell user={data?.user ?? null}>
      <ErrorPage status={status} detail={detail} stack={stack} />
    </AppShell>
  );
}
