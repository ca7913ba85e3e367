import { Link, useLocation, useMatches } from "react-router";

type Crumb = { label: string; to: string | null };

const SECTION_LABELS: Record<string, string> = {
  studies: "Studies",
  protocols: "Protocols",
  blades: "Library",
  media: "Cut media",
  instruments: "Instruments",
  results: "Results",
  members: "Members",
  invitations: "Invitations",
  audit: "Audit log",
  planning: "Planning",
  "sample-size": "Sample size",
  design: "Design",
  randomize: "Randomize",
  start: "Start",
  labels: "Label sheet",
  progress: "Progress",
  preparation: "Preparation",
  report: "Report",
  unblind: "Unblind",
  compare: "Compare",
  versions: "Versions",
  print: "Print",
  new: "New",
  edit: "Edit",
  import: "Import",
};

// Path prefixes under a lab that are no page of their own (a crumb there has no link).
const NOT_A_PAGE = [/^\/studies\/[^/]+\/design$/, /^\/protocols\/[^/]+\/versions$/, /^\/bench$/, /^\/bench\/runs$/, /^\/planning$/];

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** A name for an id, looked up in the page's own loader data (so nothing new is sent). */
function nameOf(id: string, data: unknown): string | null {
  const seen = new Set<unknown>();
  const visit = (v: unknown, depth: number): string | null => {
    if (!v || typeof v !== "object" || depth > 2 || seen.has(v)) return null;
    seen.add(v);
    const o = v as Record<string, unknown>;
    if (o.id === id) {
      for (const k of ["shortName", "name", "inventoryNumber"]) if (typeof o[k] === "string" && o[k]) return o[k] as string;
    }
    if (Array.isArray(v)) return null; // lists are not searched: only the page's own object names it
    for (const child of Object.values(o)) {
      const found = visit(child, depth + 1);
      if (found) return found;
    }
    return null;
  };
  return visit(data, 0);
}

export function breadcrumbs(pathname: string, lab: { id: string; name: string; role: string }, data: unknown): Crumb[] {
  const manager = lab.role === "owner" || lab.role === "lead";
  const prefix = `/labs/${lab.id}`;
  if (!pathname.startsWith(`${prefix}/`)) return [];
  const parts = pathname.slice(prefix.length + 1).replace(/\/$/, "").split("/");
  if (parts.length < 2) return []; // a lab's list pages need no trail: the lab navigation says where you are
  const crumbs: Crumb[] = [{ label: lab.name, to: prefix }];
  let path = "";
  parts.forEach((part, i) => {
    path += `/${part}`;
    const last = i === parts.length - 1;
    let label = SECTION_LABELS[part] ?? null;
    if (!label && UUID.test(part)) label = nameOf(part, data) ?? (parts[i - 1] === "runs" ? "Run" : "Detail");
    if (!label && parts[i - 1] === "versions") label = `Version ${part}`;
    if (!label && parts[i - 1] === "design") label = part.charAt(0).toUpperCase() + part.slice(1);
    if (part === "bench") label = "Bench";
    if (part === "runs" && parts[i - 1] === "bench") return; // "Bench › Run" says it
    if (!label) label = part;
    // Study pages are for owners and leads: others get the trail without those links.
    const closed = !manager && /^\/studies(\/[^/]+)?$/.test(path);
    crumbs.push({ label, to: last || closed || NOT_A_PAGE.some((re) => re.test(path)) ? null : prefix + path });
  });
  return crumbs;
}

/** The trail on detail pages: the lab, the place, the object, the page. */
export function Breadcrumbs({ lab }: { lab: { id: string; name: string; role: string } }) {
  const { pathname } = useLocation();
  const matches = useMatches();
  const leaf = matches[matches.length - 1];
  const crumbs = breadcrumbs(pathname, lab, leaf?.data);
  if (crumbs.length === 0) return null;
  return (
    <nav aria-label="Breadcrumb" className="-mt-3 mb-2 text-sm print:hidden" data-testid="breadcrumbs">
      <ol className="flex flex-wrap items-center gap-x-2 text-graphite-600">
        {crumbs.map((c, i) => (
          <li key={`${i}-${c.label}`} className="flex items-center gap-x-2">
            {i > 0 ? <span aria-hidden="true">›</span> : null}
            {c.to ? (
              <Link to={c.to} className="inline-flex min-h-target items-center">{c.label}</Link>
            ) : (
              <span aria-current={i === crumbs.length - 1 ? "page" : undefined} className={i === crumbs.length - 1 ? "font-bold text-graphite-950" : undefined}>
                {c.label}
              </span>
            )}
          </li>
        ))}
      </ol>
    </nav>
  );
}
