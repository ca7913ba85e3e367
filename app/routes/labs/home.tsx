import { Link } from "react-router";
import type { Route } from "./+types/home";
import { PageTitle } from "~/components/form.tsx";
import { ALL_ROLES, requireLabRole } from "~/server/access.server.ts";
import { membersOfLab } from "~/server/accounts.server.ts";
import { latestQualitySignals } from "~/server/quality.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.lab.name ?? "Lab"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role } = await requireLabRole(request, params.labId, ALL_ROLES);
  const members = await membersOfLab(lab.id);
  const testers = members.filter((m) => m.role === "tester").length;
  const qualitySignals = role === "owner" || role === "lead" ? await latestQualitySignals(lab.id) : [];
  return { lab, role, memberCount: members.length, testerCount: testers, qualitySignals };
}

export default function LabHome({ loaderData }: Route.ComponentProps) {
  const { lab, role, memberCount, testerCount, qualitySignals } = loaderData;
  const manage = role === "owner" || role === "lead";
  return (
    <div>
      <PageTitle lead={`Your role: ${ROLE_LABELS[role].name}. ${ROLE_LABELS[role].duty}`}>{lab.name}</PageTitle>
      {qualitySignals.length ? (
        <div className="mb-6 rounded border-l-4 border-fault bg-fault-soft p-3" data-testid="quality-signals">
          <strong>Reference runs out of control.</strong>
          <ul>
            {qualitySignals.map((s) => (
              <li key={`${s.reference}-${s.outcome}`}>{s.reference}, {s.outcome.toLowerCase()}: {s.rule} on {s.at} (lot {s.lot}, {s.instrument}).</li>
            ))}
          </ul>
          <Link to={`/labs/${lab.id}/quality`}>Open the quality page</Link>
        </div>
      ) : null}
      {manage && testerCount === 0 ? (
        <p className="mb-6 rounded border-l-4 border-signal bg-signal-soft p-3">
          <strong>No testers yet.</strong> A blinded study needs at least one member with the tester role: owners and leads can
          open every key, so they cannot test blind. <Link to={`/labs/${lab.id}/invitations`}>Invite a tester</Link>.
        </p>
      ) : null}
      <ul className="grid gap-3 md:grid-cols-3">
        {manage ? (
          <>
            <Tile to={`/labs/${lab.id}/members`} title="Members" text={`${memberCount} member${memberCount === 1 ? "" : "s"} and their roles`} />
            <Tile to={`/labs/${lab.id}/invitations`} title="Invitations" text="Invite by e-mail; see pending, accepted and expired invitations" />
            <Tile to={`/labs/${lab.id}/planning/sample-size`} title="Sample size" text="Blades a study needs, from the SD, the difference that matters, alpha and power" />
            <Tile to={`/labs/${lab.id}/studies`} title="Studies" text="Design, randomize, label and start blinded studies" />
            <Tile to={`/labs/${lab.id}/audit`} title="Audit log" text="Every event of the lab, chained by hash; filter by study, person and kind" />
            <Tile to={`/labs/${lab.id}/blades`} title="Library" text="Blades, cut media and lots, instruments and calibration" />
          </>
        ) : null}
        {role !== "tester" ? <Tile to={`/labs/${lab.id}/results`} title="Results" text="Closed studies: blinded results, unblinding, reports and exports" /> : null}
        {role !== "tester" ? <Tile to={`/labs/${lab.id}/quality`} title="Quality" text="Reference blades on control charts; drift of rope lots, instruments and testers" /> : null}
        <Tile to={`/labs/${lab.id}/protocols`} title="Protocols" text={manage ? "Write, publish and compare cut-test protocols" : "Read and print the lab's published protocols"} />
        <Tile to="/labs?all" title="Switch lab" text="Your other labs" />
      </ul>
    </div>
  );
}

function Tile({ to, title, text }: { to: string; title: string; text: string }) {
  return (
    <li>
      <Link to={to} className="block h-full rounded-lg border border-rule bg-card p-4 no-underline hover:border-ink">
        <span className="block text-lg font-bold text-graphite-950">{title}</span>
        <span className="text-graphite-600">{text}</span>
      </Link>
    </li>
  );
}
