import { Form, Link, NavLink, useLocation } from "react-router";
import { tableHref } from "~/lib/table-query.ts";

/** A column header that sorts the table on the server through the URL. */
export function SortHeader({ column, label, sort, dir }: { column: string; label: string; sort: string; dir: "asc" | "desc" }) {
  const { search } = useLocation();
  const active = sort === column;
  const next = active && dir === "asc" ? "desc" : "asc";
  return (
    <th scope="col" className="py-2 pr-3" aria-sort={active ? (dir === "asc" ? "ascending" : "descending") : "none"}>
      <Link to={tableHref(search, { sort: column, dir: next })} className="inline-flex min-h-target items-center gap-1 font-bold text-graphite-950 no-underline">
        {label}
        <span aria-hidden="true" className="text-graphite-600">{active ? (dir === "asc" ? "▲" : "▼") : "↕"}</span>
        <span className="sr-only">{active ? `, sorted ${dir === "asc" ? "ascending" : "descending"}` : ", sort"}</span>
      </Link>
    </th>
  );
}

export function Pagination({ page, pageSize, total }: { page: number; pageSize: number; total: number }) {
  const { search } = useLocation();
  const pages = Math.max(1, Math.ceil(total / pageSize));
  if (total === 0) return null;
  const first = (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages" className="mt-4 flex flex-wrap items-center gap-3">
      <span className="figures text-graphite-600">
        {first}–{last} of {total}
      </span>
      {page > 1 ? (
        <Link to={tableHref(search, { page: page - 1 })} className="inline-flex min-h-target items-center rounded border border-graphite-400 px-3 font-bold no-underline">
          ← Previous
        </Link>
      ) : null}
      {page < pages ? (
        <Link to={tableHref(search, { page: page + 1 })} className="inline-flex min-h-target items-center rounded border border-graphite-400 px-3 font-bold no-underline">
          Next →
        </Link>
      ) : null}
    </nav>
  );
}

/** The search box and filters of a table: a GET form, so the state is in the URL. */
export function TableFilters({ q, children, placeholder }: { q: string; children?: React.ReactNode; placeholder: string }) {
  return (
    <Form method="get" role="search" className="mb-4 flex flex-wrap items-end gap-3">
      <div className="flex flex-col gap-1">
        <label htmlFor="table-search" className="font-bold">Search</label>
        <input id="table-search" name="q" type="search" defaultValue={q} placeholder={placeholder} className="min-h-target w-64 rounded border border-graphite-400 bg-card px-3" />
      </div>
      {children}
      <button type="submit" className="min-h-target rounded border border-graphite-800 bg-card px-4 font-bold">Apply</button>
    </Form>
  );
}

export function EmptyState({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-graphite-400 bg-card p-6">
      <p className="text-lg font-bold">{title}</p>
      <div className="mt-2 text-graphite-800">{children}</div>
    </div>
  );
}

export function LibraryNav({ labId }: { labId: string }) {
  const cls = ({ isActive }: { isActive: boolean }) =>
    `inline-flex min-h-target items-center border-b-4 px-3 font-bold no-underline ${isActive ? "border-ink text-graphite-950" : "border-transparent text-graphite-600 hover:text-graphite-950"}`;
  return (
    <nav aria-label="Library" className="mb-6 flex gap-2 border-b border-rule">
      <NavLink to={`/labs/${labId}/blades`} className={cls}>Blades</NavLink>
      <NavLink to={`/labs/${labId}/media`} className={cls}>Cut media</NavLink>
      <NavLink to={`/labs/${labId}/instruments`} className={cls}>Instruments</NavLink>
    </nav>
  );
}
