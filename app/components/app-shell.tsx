import { useEffect, useRef } from "react";
import { Form, Link, NavLink, useLocation } from "react-router";
import { LabNav } from "./lab-nav.tsx";
import { Breadcrumbs } from "./breadcrumbs.tsx";
import { NavigationProgress } from "./navigation-progress.tsx";
import type { ShellUser } from "~/server/shell.server.ts";

const navClass = ({ isActive }: { isActive: boolean }) =>
  `inline-flex min-h-target items-center px-3 font-bold no-underline ${isActive ? "text-graphite-950 underline decoration-2 underline-offset-8" : "text-graphite-600 hover:text-graphite-950"}`;

/**
 * After a client-side navigation to another page, focus moves to the page's main
 * heading so a screen reader announces it and the keyboard starts from the top.
 */
function useFocusHeadingOnNavigation() {
  const { pathname } = useLocation();
  const first = useRef(true);
  useEffect(() => {
    if (first.current) {
      first.current = false;
      return;
    }
    const heading = document.querySelector<HTMLElement>("main h1");
    if (!heading) return;
    if (!heading.hasAttribute("tabindex")) heading.setAttribute("tabindex", "-1");
    heading.focus({ preventScroll: false });
  }, [pathname]);
}

export function AppShell({ user, children }: { user: ShellUser | null; children: React.ReactNode }) {
  useFocusHeadingOnNavigation();
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:bg-card focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-rule bg-card">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <Link to="/" className="flex min-h-target items-center gap-2 text-xl font-bold text-graphite-950 no-underline">
            <BrandMark />
            Blindcut
          </Link>
          <nav aria-label="Main" className="flex flex-1 flex-wrap">
            {user?.currentLab ? (
              <NavLink to={`/labs/${user.currentLab.id}`} className={navClass} end>
                {user.currentLab.name}
              </NavLink>
            ) : null}
            {user?.isTester ? (
              <NavLink to="/bench" className={navClass}>
                My runs
              </NavLink>
            ) : null}
            {user ? (
              <NavLink to="/labs?all" className={navClass} end>
                Labs
              </NavLink>
            ) : null}
          </nav>
          <div className="flex items-center gap-3" data-testid="account-area">
            {user ? (
              <>
                <Link to="/account" className="inline-flex min-h-target items-center text-graphite-800">{user.name}</Link>
                <Form method="post" action="/sign-out">
                  <button type="submit" className="min-h-target rounded border border-rule px-3 font-bold text-graphite-800 hover:bg-paper-deep">
                    Sign out
                  </button>
                </Form>
              </>
            ) : (
              <>
                <Link to="/sign-in" className="font-bold">Sign in</Link>
                <Link to="/sign-up" className="rounded bg-ink px-3 py-2 font-bold text-white no-underline hover:bg-ink-deep">
                  Create a lab
                </Link>
              </>
            )}
          </div>
        </div>
        {user?.currentLab ? <LabNav lab={user.currentLab} /> : null}
        <NavigationProgress />
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-6">
        {user?.currentLab ? <Breadcrumbs lab={user.currentLab} /> : null}
        {children}
      </main>
      <footer className="border-t border-rule py-4 text-center text-sm text-graphite-600">
        Blindcut — blinded, randomized cut tests of knife edges
      </footer>
    </div>
  );
}

/** Blindcut's mark: an edge profile crossed by a blind bar. */
function BrandMark() {
  return (
    <svg width="28" height="28" viewBox="0 0 28 28" aria-hidden="true">
      <path d="M3 22 L25 6 L25 22 Z" fill="var(--color-graphite-800)" />
      <rect x="2" y="11" width="24" height="5" fill="var(--color-signal)" />
    </svg>
  );
}
