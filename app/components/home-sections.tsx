import { Link } from "react-router";
import type { HomeItem, HomeProgress, HomeSection } from "~/server/home.server.ts";
import { StateBadge } from "./state-badge.tsx";
import { useLabDates } from "~/lib/use-lab-dates.ts";

/** The lab home's "what needs doing now": one section per kind of work, each item a link to where it is done. */
export function HomeSections({ sections }: { sections: HomeSection[] }) {
  return (
    <div className="space-y-6" data-testid="home-sections">
      {sections.map((s) => (
        <section key={s.id} aria-labelledby={`home-${s.id}`} data-testid={`home-${s.id}`} className="rounded-lg border border-rule bg-card p-4">
          <h2 id={`home-${s.id}`} className="mb-3 text-xl font-bold">
            {s.title} <span className="figures text-base font-normal text-graphite-600">({s.items.length})</span>
          </h2>
          {s.items.length === 0 ? (
            <p className="text-graphite-600">{s.empty}</p>
          ) : (
            <ul className="divide-y divide-rule">
              {s.items.map((item) => (
                <HomeRow key={item.key} item={item} />
              ))}
            </ul>
          )}
          {s.more ? (
            <p className="mt-3 text-sm">
              <Link to={s.more.href}>{s.more.label}</Link>
            </p>
          ) : null}
        </section>
      ))}
    </div>
  );
}

function HomeRow({ item }: { item: HomeItem }) {
  const { formatDateTime } = useLabDates();
  if (item.primary) {
    return (
      <li className="py-3" data-testid="home-next-run">
        <Link to={item.href} className="inline-flex min-h-target items-center rounded bg-ink px-4 text-lg font-bold text-white no-underline hover:bg-ink-deep">
          Start the next run: {item.label}
        </Link>
        {item.detail ? <p className="mt-1 text-sm text-graphite-600">{item.detail}</p> : null}
      </li>
    );
  }
  return (
    <li className="flex flex-wrap items-start gap-x-3 gap-y-1 py-2">
      {item.badge ? <StateBadge kind={item.badge.kind} state={item.badge.state} /> : null}
      <div className="min-w-0 flex-1">
        <Link to={item.href} className="font-bold">{item.label}</Link>
        {item.detail || item.at ? (
          <span className="block text-sm text-graphite-600">
            {item.detail}
            {item.at ? <> <time dateTime={item.at}>{formatDateTime(item.at)}</time></> : null}
          </span>
        ) : null}
        {item.lines?.length ? (
          <ul className="mt-1 list-disc pl-5 text-sm text-graphite-800">
            {item.lines.map((l) => (
              <li key={l}>{l}</li>
            ))}
          </ul>
        ) : null}
        {item.progress ? <ProgressBar progress={item.progress} /> : null}
      </div>
    </li>
  );
}

/** Done / in progress / waiting as a stacked bar, with the numbers in words beside it. */
function ProgressBar({ progress: p }: { progress: HomeProgress }) {
  const pct = (n: number) => `${p.total ? (100 * n) / p.total : 0}%`;
  const words = `${p.done} done, ${p.inProgress} in progress, ${p.waiting} waiting of ${p.total} runs`;
  return (
    <div className="mt-2" data-testid="home-progress">
      <div role="img" aria-label={words} className="flex h-3 w-full max-w-md overflow-hidden rounded border border-graphite-400 bg-paper-deep">
        <span className="h-full bg-graphite-800" style={{ width: pct(p.done) }} />
        <span className="h-full bg-ink bg-[repeating-linear-gradient(45deg,transparent_0_3px,rgba(255,255,255,.5)_3px_6px)]" style={{ width: pct(p.inProgress) }} />
      </div>
      <p className="figures mt-1 text-sm text-graphite-800" aria-hidden="true">{words}</p>
    </div>
  );
}
