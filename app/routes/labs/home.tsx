import { Link } from "react-router";
import type { Route } from "./+types/home";
import { PageTitle } from "~/components/form.tsx";
import { HomeSections } from "~/components/home-sections.tsx";
import { ALL_ROLES, requireLabRole } from "~/server/access.server.ts";
import { membersOfLab } from "~/server/accounts.server.ts";
import { latestQualitySignals } from "~/server/quality.server.ts";
import { labHome } from "~/server/home.server.ts";
import { ROLE_LABELS } from "~/lib/roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.lab.name ?? "Lab"} · Blindcut` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { lab, role, user } = await requireLabRole(request, params.labId, ALL_ROLES);
  const manage = role === "owner" || role === "lead";
  const [sections, members] = await Promise.all([labHome({ labId: lab.id, userId: user.id, role }), manage ? membersOfLab(lab.id) : Promise.resolve([])]);
  const qualitySignals = manage ? await latestQualitySignals(lab.id) : [];
  return { lab, role, sections, memberCount: members.length, testerCount: members.filter((m) => m.role === "tester").length, qualitySignals };
}

export default function LabHome({ loaderData }: Route.ComponentProps) {
  const { lab, role, sections, memberCount, testerCount, qualitySignals } = loaderData;
  const manage = role === "owner" || role === "lead";
  const base = `/labs/${lab.id}`;
  const links: { to: string; title: string; text: string }[] = [
    ...(role === "tester" ? [{ to: "/bench", title: "My runs", text: "Every run assigned to you, by blind code" }] : []),
    ...(manage
      ? [
          { to: `${base}/studies`, title: "Studies", text: "Design, randomize, label and start blinded studies" },
          { to: `${base}/blades`, title: "Library", text: "Blades, cut media and lots, instruments and calibration" },
        ]
      : []),
    { to: `${base}/protocols`, title: "Protocols", text: manage ? "Write, publish and compare cut-test protocols" : "Read and print the lab's published protocols" },
    ...(role !== "tester" ? [{ to: `${base}/results`, title: "Results", text: "Closed studies: blinded results, unblinding, reports and exports" }] : []),
    ...(role !== "tester" ? [{ to: `${base}/quality`, title: "Quality", text: "Reference blades on control charts; drift of rope lots, instruments and testers" }] : []),
    ...(manage
      ? [
          { to: `${base}/planning/sample-size`, title: "Sample size", text: "Blades a study needs, from the SD, the difference that matters, alpha and power" },
          { to: `${base}/members`, title: "Members", text: `${memberCount} member${memberCount === 1 ? "" : "s"} and their roles` },
          { to: `${base}/invitations`, title: "Invitations", text: "Invite by e-mail; pending, accepted and expired invitations" },
          { to: `${base}/audit`, title: "Audit log", text: "Every event of the lab, chained by hash" },
        ]
      : []),
    { to: "/labs?all", title: "Switch lab", text: "Your other labs" },
  ];
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
          open every key, so they cannot test blind. <Link to={`${base}/invitations`}>Invite a tester</Link>.
        </p>
      ) : null}
      <div className="grid gap-6 lg:grid-cols-[1fr_16rem]">
        <HomeSections sections={sections} />
        <nav aria-labelledby="home-more" className="lg:border-l lg:border-rule lg:pl-6">
          <h2 id="home-more" className="mb-2 text-lg font-bold">Everything else</h2>
          <ul className="space-y-2" data-testid="home-links">
            {links.map((l) => (
              <li key={l.to}>
                <Link to={l.to} className="font-bold">{l.title}</Link>
                <span className="block text-sm text-graphite-600">{l.text}</span>
              </li>
            ))}
          </ul>
        </nav>
      </div>
    </div>
  );
}
