import { Form, Link } from "react-router";
import { useLabDates } from "~/lib/use-lab-dates.ts";
import { z } from "zod";
import type { Route } from "./+types/audit";
import { PageTitle } from "~/components/form.tsx";
import { EmptyState, Pagination } from "~/components/table.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { auditLogPage } from "~/server/audit-log.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Audit log · Blindcut" }];

const PAGE = 50;
const Filters = z.object({
  study: z.string().uuid().optional().catch(undefined),
  person: z.string().uuid().optional().catch(undefined),
  kind: z.string().regex(/^[a-z_.]{1,60}$/).optional().catch(undefined),
  page: z.coerce.number().int().min(1).max(10_000).catch(1),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const url = new URL(request.url);
  const f = Filters.parse(Object.fromEntries(url.searchParams));
  const { rows, total, studies, people, kinds } = await auditLogPage(lab.id, f, PAGE);
  return {
    lab,
    filters: f,
    total,
    studies,
    people,
    kinds,
    rows: rows.map((r) => ({ ...r, at: r.at.toISOString(), details: JSON.stringify(r.details) })),
  };
}

export default function AuditLog({ loaderData }: Route.ComponentProps) {
  const { formatDateTime, timeZone } = useLabDates();
  const { lab, filters, rows, total } = loaderData;
  return (
    <div>
      <PageTitle lead="Every event of the lab, newest first. Each event carries the hash of its content and of the event before it; `npm run audit:verify` checks the chain.">
        Audit log
      </PageTitle>
      <Form method="get" className="mb-4 flex flex-wrap items-end gap-3">
        <Select label="Study" name="study" value={filters.study} options={loaderData.studies.map((s) => ({ value: s.id, label: s.name }))} />
        <Select label="Person" name="person" value={filters.person} options={loaderData.people.map((p) => ({ value: p.id, label: p.name }))} />
        <Select label="Kind" name="kind" value={filters.kind} options={loaderData.kinds.map((k) => ({ value: k, label: k }))} />
        <button type="submit" className="min-h-target rounded border border-graphite-800 bg-card px-4 font-bold">Apply</button>
        <Link to={`/labs/${lab.id}/audit`} className="inline-flex min-h-target items-center px-2">Clear</Link>
      </Form>
      {rows.length === 0 ? (
        <EmptyState title="No events match">Clear the filters to see the whole log.</EmptyState>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full border-collapse text-left text-sm" data-testid="audit-table">
            <thead>
              <tr className="border-b-2 border-graphite-800">
                <th scope="col" className="py-2 pr-3">#</th>
                <th scope="col" className="py-2 pr-3">When ({timeZone})</th>
                <th scope="col" className="py-2 pr-3">What</th>
                <th scope="col" className="py-2 pr-3">Who</th>
                <th scope="col" className="py-2 pr-3">Details</th>
                <th scope="col" className="py-2 pr-3">Hash</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((r) => (
                <tr key={r.seq} className="border-b border-rule align-top">
                  <td className="figures py-1 pr-3">{r.seq}</td>
                  <td className="figures py-1 pr-3"><time dateTime={r.at}>{formatDateTime(r.at)}</time></td>
                  <td className="py-1 pr-3 font-bold">{r.action}</td>
                  <td className="py-1 pr-3">{r.actor ?? "system"}</td>
                  <td className="max-w-md break-words py-1 pr-3 font-mono text-xs">{r.details === "{}" ? "" : r.details}</td>
                  <td className="py-1 pr-3 font-mono text-xs">{r.hash.slice(0, 12)}…</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <Pagination page={filters.page} pageSize={PAGE} total={total} />
    </div>
  );
}

function Select({ label, name, value, options }: { label: string; name: string; value?: string; options: { value: string; label: string }[] }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={`audit-${name}`} className="font-bold">{label}</label>
      <select id={`audit-${name}`} name={name} defaultValue={value ?? ""} className="min-h-target max-w-64 rounded border border-graphite-400 bg-card px-2">
        <option value="">Any</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>{o.label}</option>
        ))}
      </select>
    </div>
  );
}
