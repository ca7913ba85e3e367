import type { ReportChart } from "~/server/analysis/report-charts.server.ts";

/**
 * The report's charts as server-rendered SVG (Vega's own renderer): printed and saved as
 * PDF without client JavaScript. The SVG comes from Vega, which escapes its text.
 */
export function ReportCharts({ charts }: { charts: ReportChart[] }) {
  if (!charts.length) return null;
  return (
    <section className="mt-6" data-testid="report-charts" aria-labelledby="report-charts-title">
      <h2 id="report-charts-title" className="border-b border-rule pb-1 text-xl font-bold">Charts</h2>
      {charts.map((c) => (
        <figure key={c.id} className="mt-4 break-inside-avoid-page" data-testid={`report-chart-${c.id}`}>
          <figcaption className="font-bold">{c.title}</figcaption>
          <p className="text-sm text-graphite-600">{c.description} The same numbers as the results page; its tables are above.</p>
          <div role="img" aria-label={`${c.title}. ${c.description}`} className="mt-2 max-w-full overflow-hidden [&_svg]:h-auto [&_svg]:max-w-full" dangerouslySetInnerHTML={{ __html: c.svg }} />
        </figure>
      ))}
    </section>
  );
}
