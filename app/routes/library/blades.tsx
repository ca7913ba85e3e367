import { Link } from "react-router";
import type { Route } from "./+types/blades";
import { PageTitle } from "~/components/form.tsx";
import { EmptyState, LibraryNav, Pagination, SortHeader, TableFilters } from "~/components/table.tsx";
import { MANAGERS, requireLabRole } from "~/server/access.server.ts";
import { BLADE_SORTS, listBlades } from "~/server/library.server.ts";
import { parseTableQuery } from "~/lib/table-query.ts";
import { BLADE_STATUS_LABELS, BLADE_STATUSES } from "~/lib/library-input.ts";
import { summarizeHardness } from "~/domain/hardness.ts";

export const meta: Route.MetaFunction = () => [{ title: "Blades · Library · Blindcut" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab } = await requireLabRole(request, params.labId, MANAGERS);
  const query = parseTableQuery(new URL(request.url), BLADE_SORTS, { sort: "inventoryNumber" }, ["status", "steel"]);
  const { rows, total } = await listBlades(lab.id, query);
  return {
    lab,
    query,
    total,
    search: new URL(request.url).search,
    rows: rows.map((b) => ({
      id: b.id,
      inventoryNumber: b.inventoryNumber,
      steel: b.steel,
      status: b.status,
      hardness: b.hardnessHrc.length ? summarizeHardness(b.hardnessHrc).mean : null,
      edgeAngleDeg: b.edgeAngleDeg,
    })),
  };
}

export default function Blades({ loaderData }: Route.ComponentProps) {
  const { lab, query, rows, total } = loaderData;
  const exportHref = `/labs/${lab.id}/blades/export.csv${loaderData.search}`;
  const filtered = query.q || Object.keys(query.filters).length > 0;
  return (
    <div>
      <LibraryNav labId={lab.id} />
      <div className="flex flex-wrap items-start justify-between gap-4">
        <PageTitle lead="The lab's blades with what blinding hides from testers: only owners and leads see this library.">Blades</PageTitle>
        <div className="flex flex-wrap gap-2">
          <Link to={`/labs/${lab.id}/blades/new`} className="inline-flex min-h-target items-center rounded bg-ink px-4 font-bold text-white no-underline">Add a blade</Link>
          <Link to={`/labs/${lab.id}/blades/import`} className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Import CSV</Link>
          <a href={exportHref} download className="inline-flex min-h-target items-center rounded border border-graphite-800 px-4 font-bold text-graphite-950 no-underline">Export CSV</a>
        </div>
      </div>
      <TableFilters q={query.q} placeholder="Inventory number, steel, source…">
        <div className="flex flex-col gap-1">
          <label htmlFor="filter-status" className="font-bold">Status</label>
          <select id="filter-status" name="status" defaultValue={query.filters.status ?? ""} className="min-h-target rounded border border-graphite-400 bg-card px-2">
            <option value="">Any</option>
            {BLADE_STATUSES.map((s) => (
              <option key={s} value={s}>{BLADE_STATUS_LABELS[s]}</option>
            ))}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="filter-steel" className="font-bold">Steel</label>
          <input id="filter-steel" name="steel" defaultValue={query.filters.steel ?? ""} className="min-h-target w-40 rounded border border-graphite-400 bg-card px-3" />
        </div>
      </TableFilters>
      {rows.length === 0 ? (
        filtered ? (
          <EmptyState title="No blade matches">Clear the search or the filters to see every blade.</EmptyState>
        ) : (
          <EmptyState title="No blades yet">
            Add the first blade with <Link to={`/labs/${lab.id}/blades/new`}>Add a blade</Link>, or bring many at once with <Link to={`/labs/${lab.id}/blades/import`}>Import CSV</Link>.
          </EmptyState>
        )
      ) : (
        <table className="w-full border-collapse text-left" data-testid="blades-table">
          <thead>
            <tr className="border-b-2 border-graphite-800">
              <SortHeader column="inventoryNumber" label="Inventory number" sort={query.sort} dir={query.dir} />
              <SortHeader column="steel" label="Steel" sort={query.sort} dir={query.dir} />
              <th scope="col" className="py-2 pr-3">Hardness (mean, HRC)</th>
              <th scope="col" className="py-2 pr-3">Edge angle per side (°)</th>
              <SortHeader column="status" label="Status" sort={query.sort} dir={query.dir} />
            </tr>
          </thead>
          <tbody>
            {rows.map((b) => (
              <tr key={b.id} className="border-b border-rule">
                <td className="py-2 pr-3 font-bold">
                  <Link to={`/labs/${lab.id}/blades/${b.id}`}>{b.inventoryNumber}</Link>
                </td>
                <td className="py-2 pr-3">{b.steel}</td>
                <td className="figures py-2 pr-3">{b.hardness === null ? "—" : b.hardness.toFixed(1)}</td>
                <td className="figures py-2 pr-3">{b.edgeAngleDeg ?? "—"}</td>
                <td className="py-2 pr-3">{BLADE_STATUS_LABELS[b.status]}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <Pagination page={query.page} pageSize={query.pageSize} total={total} />
    </div>
  );
}
