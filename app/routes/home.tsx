import { Link } from "react-router";
import type { Route } from "./+types/home";
import { exampleBlindCode } from "~/domain/blind-codes.ts";

const EXAMPLE_CODE = exampleBlindCode("7KQ2M");

export const meta: Route.MetaFunction = () => [
  { title: "Blindcut — blinded cut tests of knife edges" },
  { name: "description", content: "Design, run and analyse blinded, randomized edge-retention studies." },
];

export default function Home() {
  return (
    <div className="grid gap-10 py-8 md:grid-cols-[3fr_2fr] md:items-center">
      <section>
        <h1 className="text-display font-bold">Edge retention, tested like a trial.</h1>
        <p className="mt-6 max-w-prose text-lg leading-relaxed text-graphite-800">
          Blindcut lets a test lab write a versioned cut-test protocol, randomize which blade is cut when and by whom,
          and hand testers blades they know only by a blind code. Readings are saved at the bench as they are taken, and
          the analyst reads intervals and effect sizes computed blind, before anyone learns which steel was which.
        </p>
        <p className="mt-8 flex flex-wrap gap-4">
          <Link to="/sign-up" className="inline-flex min-h-target items-center rounded bg-ink px-5 font-bold text-white no-underline hover:bg-ink-deep">
            Create a lab
          </Link>
          <Link to="/sign-in" className="inline-flex min-h-target items-center rounded border border-graphite-800 px-5 font-bold text-graphite-950 no-underline hover:bg-paper-deep">
            Sign in
          </Link>
        </p>
      </section>
      <figure className="rounded-lg border border-rule bg-card p-5" aria-label="An example sharpness reading">
        <figcaption className="text-sm font-bold tracking-wide text-graphite-600">BLADE {EXAMPLE_CODE} · CUT 24 · MIDDLE</figcaption>
        <p className="figures mt-2 text-figure font-bold">
          212 <span className="text-lg font-normal text-graphite-600">gf</span>
        </p>
        <div className="mt-4 h-2 rounded bg-paper-deep">
          <div className="h-2 rounded bg-graphite-800" style={{ width: "53%" }} />
        </div>
        <p className="figures mt-2 flex justify-between text-sm text-graphite-600">
          <span>0 gf</span>
          <span className="font-bold text-signal">stop at 400 gf ▲</span>
        </p>
      </figure>
    </div>
  );
}
