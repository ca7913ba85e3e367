import { BENCH_CAUTIONS, SAFETY_DEFERENCE } from "~/domain/protocol.ts";

/** The usual cutting cautions, on every bench screen. */
export function BenchCautions() {
  return (
    <aside aria-labelledby="bench-cautions" className="rounded-lg border-2 border-graphite-800 bg-card p-4">
      <h2 id="bench-cautions" className="mb-2 text-lg font-bold">
        <span aria-hidden="true">⚠ </span>Cutting safety
      </h2>
      <ul className="list-disc space-y-1 pl-5 text-graphite-800">
        {BENCH_CAUTIONS.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
      <p className="mt-3 font-bold">{SAFETY_DEFERENCE}</p>
    </aside>
  );
}

/** One line of the cautions, kept at the top of the run page while the full list sits below. */
export function BenchCautionStrip() {
  return (
    <p className="rounded border-l-4 border-graphite-800 bg-card px-3 py-2 text-graphite-800" data-testid="caution-strip">
      <span aria-hidden="true">⚠ </span>
      <strong>Cut safely:</strong> cut-resistant gloves · medium in a fixture · cut away from you, free hand clear · blades sheathed or racked between runs · keep sharpening dust down · first aid at hand.{" "}
      <a href="#bench-cautions">Your lab's own rules come first.</a>
    </p>
  );
}
