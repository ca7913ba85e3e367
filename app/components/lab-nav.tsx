import { Link, useLocation } from "react-router";
import type { LabRole } from "~/server/db/schema/accounts.ts";

type NavItem = { id: string; label: string; to: string; /** Paths under the lab that belong to this place. */ match: RegExp };

/** The lab's places by role, in order of use. */
export function labNavItems(labId: string, role: LabRole): NavItem[] {
  const base = `/labs/${labId}`;
  const home: NavItem = { id: "home", label: "Home", to: base, match: /^$/ };
  const protocols: NavItem = { id: "protocols", label: "Protocols", to: `${base}/protocols`, match: /^\/protocols/ };
  const results: NavItem = { id: "results", label: "Results", to: `${base}/results`, match: /^\/(results|studies\/[^/]+\/(results|report)|api\/studies)/ };
  if (role === "tester") return [home, { id: "bench", label: "My runs", to: "/bench", match: /^\/bench/ }, protocols];
  const quality: NavItem = { id: "quality", label: "Quality", to: `${base}/quality`, match: /^\/quality/ };
  if (role === "analyst") return [home, results, quality, protocols];
  return [
    home,
    { id: "studies", label: "Studies", to: `${base}/studies`, match: /^\/(studies|planning)/ },
    protocols,
    { id: "library", label: "Library", to: `${base}/blades`, match: /^\/(blades|media|instruments)/ },
    results,
    quality,
    { id: "members", label: "Members", to: `${base}/members`, match: /^\/(members|invitations|audit|settings)/ },
  ];
}

/** Which place a path is in: the first item (most specific listed first) whose pattern matches. */
export function currentPlace(items: NavItem[], labId: string, pathname: string): string | null {
  if (pathname === "/bench") return items.find((i) => i.id === "bench")?.id ?? null;
  const prefix = `/labs/${labId}`;
  if (!pathname.startsWith(prefix)) return null;
  const rest = pathname.slice(prefix.length).replace(/\/$/, "");
  // Results pages of a study belong to Results, not Studies: test Results first.
  const ordered = [...items].sort((a, b) => (a.id === "results" ? -1 : b.id === "results" ? 1 : 0));
  if (rest.startsWith("/bench")) return items.find((i) => i.id === "bench")?.id ?? items.find((i) => i.id === "studies")?.id ?? null;
  return ordered.find((i) => i.match.test(rest))?.id ?? null;
}

/** The persistent lab navigation: where you are is marked by aria-current and by shape, not colour alone. */
export function LabNav({ lab }: { lab: { id: string; name: string; role: LabRole } }) {
  const { pathname } = useLocation();
  const items = labNavItems(lab.id, lab.role);
  const here = currentPlace(items, lab.id, pathname);
  return (
    <nav aria-label="Lab" className="border-t border-rule bg-paper" data-testid="lab-nav">
      <ul className="mx-auto flex max-w-6xl flex-wrap gap-x-1 px-4">
        {items.map((item) => {
          const active = item.id === here;
          const exact = active && pathname.replace(/\/$/, "") === item.to;
          return (
            <li key={item.id}>
              <Link
                to={item.to}
                aria-current={exact ? "page" : active ? "location" : undefined}
                className={`inline-flex min-h-target items-center border-b-4 px-3 font-bold no-underline ${active ? "border-ink text-graphite-950" : "border-transparent text-graphite-600 hover:text-graphite-950"}`}
              >
                {item.label}
              </Link>
            </li>
          );
        })}
      </ul>
    </nav>
  );
}
