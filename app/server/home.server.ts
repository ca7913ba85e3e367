// The lab home: per role, what needs doing now. Built as a list of sections so another
// area can add its own (push a builder onto HOME_SECTIONS). Every item links to the page
// where the work is done. A tester's sections carry only what the bench may show.
import { and, asc, desc, eq, gt, inArray, isNull, sql } from "drizzle-orm";
import { db } from "./db.server.ts";
import { auditEvents, calibrationChecks, instruments, invitations, runs, studies, users } from "./db/schema/index.ts";
import type { LabRole } from "./db/schema/accounts.ts";
import { loadDesign, designProblems } from "./studies/randomize.server.ts";
import { testerQueue } from "./bench/queue.server.ts";
import { calibrationStatus, CALIBRATION_STATE_LABELS } from "~/domain/calibration.ts";
import type { BadgeKind } from "~/lib/states.ts";
import { formatDate } from "~/lib/dates.ts";

export type HomeProgress = { done: number; inProgress: number; waiting: number; total: number };

export type HomeItem = {
  key: string;
  label: string;
  href: string;
  detail?: string;
  /** Further lines (e.g. what a draft still lacks). */
  lines?: string[];
  progress?: HomeProgress;
  badge?: { kind: BadgeKind; state: string };
  /** An ISO instant shown through the date helper. */
  at?: string;
  /** The one primary button of the section (the tester's next run). */
  primary?: boolean;
};

export type HomeSection = { id: string; title: string; empty: string; items: HomeItem[]; more?: { label: string; href: string } };

export type HomeContext = { labId: string; userId: string; role: LabRole; today: string; now: Date };

type SectionBuilder = { roles: readonly LabRole[]; build: (ctx: HomeContext) => Promise<HomeSection | null> };

const MANAGE: LabRole[] = ["owner", "lead"];
const DUE_SOON_DAYS = 30;
const AUDIT_COUNT = 5;
const RECENT_UNBLIND_COUNT = 5;

const base = (labId: string) => `/labs/${labId}`;

async function runCounts(studyIds: string[]) {
  if (!studyIds.length) return new Map<string, HomeProgress>();
  const rows = await db()
    .select({ studyId: runs.studyId, state: runs.state, n: sql<number>`count(*)::int` })
    .from(runs)
    .where(inArray(runs.studyId, studyIds))
    .groupBy(runs.studyId, runs.state);
  const out = new Map<string, HomeProgress>();
  for (const r of rows) {
    const p = out.get(r.studyId) ?? { done: 0, inProgress: 0, waiting: 0, total: 0 };
    if (r.state === "waiting") p.waiting += r.n;
    else if (r.state === "in_progress") p.inProgress += r.n;
    else p.done += r.n; // ended, censored and withdrawn runs are finished business
    p.total += r.n;
    out.set(r.studyId, p);
  }
  return out;
}

// Trials only, as on the studies list: reference series and precision studies belong to the quality page.
async function runningStudies(labId: string) {
  const rows = await db()
    .select({ id: studies.id, shortName: studies.shortName, startedAt: studies.startedAt })
    .from(studies)
    .where(and(eq(studies.labId, labId), eq(studies.kind, "trial"), eq(studies.state, "running")))
    .orderBy(asc(studies.startedAt));
  return { rows, counts: await runCounts(rows.map((r) => r.id)) };
}

const running: SectionBuilder = {
  roles: MANAGE,
  async build({ labId }) {
    const { rows, counts } = await runningStudies(labId);
    const open = rows.filter((r) => (counts.get(r.id)?.waiting ?? 0) + (counts.get(r.id)?.inProgress ?? 0) > 0);
    // The waiting run first in the schedule of each study: the one the bench is held up on.
    const oldest = open.length
      ? await db()
          .selectDistinctOn([runs.studyId], { studyId: runs.studyId, position: runs.schedulePosition, tester: users.name })
          .from(runs)
          .innerJoin(users, eq(users.id, runs.testerId))
          .where(and(inArray(runs.studyId, open.map((r) => r.id)), eq(runs.state, "waiting")))
          .orderBy(runs.studyId, asc(runs.schedulePosition))
      : [];
    const oldestOf = new Map(oldest.map((o) => [o.studyId, o]));
    return {
      id: "running",
      title: "Running studies",
      empty: "No study is running.",
      items: open.map((s) => {
        const p = counts.get(s.id)!;
        const o = oldestOf.get(s.id);
        return {
          key: s.id,
          label: s.shortName,
          href: `${base(labId)}/studies/${s.id}/progress`,
          progress: p,
          badge: { kind: "study", state: "running" },
          detail: o ? `Oldest waiting run: #${o.position} in the schedule (${o.tester})` : "No run is waiting; runs in progress are at the bench.",
        };
      }),
    };
  },
};

const readyToClose: SectionBuilder = {
  roles: MANAGE,
  async build({ labId }) {
    const { rows, counts } = await runningStudies(labId);
    const ready = rows.filter((r) => {
      const p = counts.get(r.id);
      return p && p.total > 0 && p.waiting === 0 && p.inProgress === 0;
    });
    return {
      id: "ready-to-close",
      title: "Ready to close",
      empty: "No study has all its runs ended.",
      items: ready.map((s) => ({
        key: s.id,
        label: s.shortName,
        href: `${base(labId)}/studies/${s.id}/results`,
        detail: `All ${counts.get(s.id)!.total} runs have ended: close the study to take its blinded analysis.`,
        badge: { kind: "study", state: "running" },
      })),
    };
  },
};

const drafts: SectionBuilder = {
  roles: MANAGE,
  async build({ labId }) {
    const rows = await db()
      .select({ id: studies.id })
      .from(studies)
      .where(and(eq(studies.labId, labId), eq(studies.kind, "trial"), eq(studies.state, "draft")))
      .orderBy(desc(studies.updatedAt))
      .limit(10);
    const items: HomeItem[] = [];
    for (const r of rows) {
      const loaded = await db().transaction((tx) => loadDesign(tx, labId, r.id, { lock: false }));
      if (!loaded) continue;
      const problems = designProblems(loaded as Parameters<typeof designProblems>[0]);
      items.push({
        key: r.id,
        label: loaded.study.shortName || "Untitled draft",
        href: `${base(labId)}/studies/${r.id}`,
        badge: { kind: "study", state: "draft" },
        detail: problems.length ? `Still lacks ${problems.length} thing${problems.length === 1 ? "" : "s"}:` : "Ready to randomize.",
        lines: problems.slice(0, 4).concat(problems.length > 4 ? [`and ${problems.length - 4} more`] : []),
      });
    }
    return { id: "drafts", title: "Drafts", empty: "No draft study.", items, more: { label: "All studies", href: `${base(labId)}/studies` } };
  },
};

const calibration: SectionBuilder = {
  roles: MANAGE,
  async build({ labId, today }) {
    const list = await db().select().from(instruments).where(and(eq(instruments.labId, labId), eq(instruments.retired, false))).orderBy(asc(instruments.name));
    const last = list.length
      ? await db()
          .selectDistinctOn([calibrationChecks.instrumentId], { instrumentId: calibrationChecks.instrumentId, on: calibrationChecks.on, passed: calibrationChecks.passed })
          .from(calibrationChecks)
          .where(inArray(calibrationChecks.instrumentId, list.map((i) => i.id)))
          .orderBy(calibrationChecks.instrumentId, desc(calibrationChecks.on), desc(calibrationChecks.recordedAt))
      : [];
    const lastOf = new Map(last.map((c) => [c.instrumentId, c]));
    const soon = new Date(Date.parse(`${today}T00:00:00Z`) + DUE_SOON_DAYS * 86_400_000).toISOString().slice(0, 10);
    const items: HomeItem[] = [];
    for (const i of list) {
      const status = calibrationStatus(lastOf.get(i.id) ?? null, i.calibrationIntervalDays, today);
      const dueSoon = !status.flagged && status.dueOn <= soon;
      if (!status.flagged && !dueSoon) continue;
      items.push({
        key: i.id,
        label: i.name,
        href: `${base(labId)}/instruments/${i.id}`,
        badge: { kind: "calibration", state: status.flagged ? status.state : "due_soon" },
        detail: status.flagged
          ? `${CALIBRATION_STATE_LABELS[status.state]}${status.dueOn ? ` (due ${formatDate(status.dueOn)})` : ""}: record a check before the next run.`
          : `Due on ${formatDate(status.dueOn)}, within ${DUE_SOON_DAYS} days.`,
      });
    }
    return { id: "calibration", title: "Calibration", empty: `Every instrument is calibrated for the next ${DUE_SOON_DAYS} days.`, items };
  },
};

const pendingInvitations: SectionBuilder = {
  roles: MANAGE,
  async build({ labId, now }) {
    const rows = await db()
      .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt })
      .from(invitations)
      .where(and(eq(invitations.labId, labId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)))
      .orderBy(asc(invitations.expiresAt));
    return {
      id: "invitations",
      title: "Pending invitations",
      empty: "No invitation is pending.",
      items: rows.map((r) => ({ key: r.id, label: r.email, href: `${base(labId)}/invitations`, detail: `as ${r.role}, expires`, at: r.expiresAt.toISOString() })),
    };
  },
};

const recentAudit: SectionBuilder = {
  roles: MANAGE,
  async build({ labId }) {
    const rows = await db()
      .select({ seq: auditEvents.seq, action: auditEvents.action, at: auditEvents.at, actor: users.name })
      .from(auditEvents)
      .leftJoin(users, eq(users.id, auditEvents.actorId))
      .where(eq(auditEvents.labId, labId))
      .orderBy(desc(auditEvents.seq))
      .limit(AUDIT_COUNT);
    return {
      id: "audit",
      title: "Latest audit events",
      empty: "No event yet.",
      items: rows.map((r) => ({ key: String(r.seq), label: r.action.replaceAll("_", " ").replace(".", ": "), href: `${base(labId)}/audit?kind=${encodeURIComponent(r.action)}`, detail: `${r.actor ?? "system"} ·`, at: r.at.toISOString() })),
      more: { label: "Audit log", href: `${base(labId)}/audit` },
    };
  },
};

// Testers: only what the bench queue selects (blind codes, schedule positions, run states).
const testerRuns: SectionBuilder = {
  roles: ["tester"],
  async build({ labId, userId }) {
    const queue = (await testerQueue(userId)).filter((s) => s.labId === labId);
    const items: HomeItem[] = [];
    const next = queue.find((s) => s.nextRunId);
    for (const s of queue) {
      for (const sitting of s.sittings) {
        for (const r of sitting.runs) {
          if (r.state !== "waiting" && r.state !== "in_progress") continue;
          items.push({
            key: r.id,
            label: `${r.blindCode} · ${r.runOfBlade}`,
            href: r.url,
            detail: `${s.shortName}, sitting ${sitting.sitting}, #${r.schedulePosition} in the schedule`,
            badge: { kind: "run", state: r.state },
            primary: next?.nextRunId === r.id,
          });
        }
      }
    }
    // The next run first, as the one button; the others as a list.
    items.sort((a, b) => Number(!!b.primary) - Number(!!a.primary));
    return { id: "my-runs", title: "Your runs", empty: "No run is waiting for you.", items: items.slice(0, 12), more: { label: "All my runs", href: "/bench" } };
  },
};

const awaitingAnalysis: SectionBuilder = {
  roles: ["analyst", "owner", "lead"],
  async build({ labId }) {
    const rows = await db()
      .select({ id: studies.id, shortName: studies.shortName, closedAt: studies.closedAt })
      .from(studies)
      .where(and(eq(studies.labId, labId), eq(studies.kind, "trial"), eq(studies.state, "closed")))
      .orderBy(desc(studies.closedAt));
    return {
      id: "awaiting-analysis",
      title: "Closed, waiting for analysis",
      empty: "No closed study is waiting.",
      items: rows.map((r) => ({ key: r.id, label: r.shortName, href: `${base(labId)}/studies/${r.id}/results`, badge: { kind: "study", state: "closed" }, detail: "Blinded results · closed", at: r.closedAt?.toISOString() })),
    };
  },
};

const recentlyUnblinded: SectionBuilder = {
  roles: ["analyst"],
  async build({ labId }) {
    const rows = await db()
      .select({ id: studies.id, shortName: studies.shortName, unblindedAt: studies.unblindedAt })
      .from(studies)
      .where(and(eq(studies.labId, labId), eq(studies.kind, "trial"), eq(studies.state, "unblinded")))
      .orderBy(desc(studies.unblindedAt))
      .limit(RECENT_UNBLIND_COUNT);
    return {
      id: "unblinded",
      title: "Recently unblinded",
      empty: "No study was unblinded recently.",
      items: rows.map((r) => ({ key: r.id, label: r.shortName, href: `${base(labId)}/studies/${r.id}/results`, badge: { kind: "study", state: "unblinded" }, detail: "Unblinded", at: r.unblindedAt?.toISOString() })),
      more: { label: "All results", href: `${base(labId)}/results` },
    };
  },
};

/** The home's sections in the order shown; append a builder to add one. */
export const HOME_SECTIONS: SectionBuilder[] = [testerRuns, running, readyToClose, awaitingAnalysis, recentlyUnblinded, drafts, calibration, pendingInvitations, recentAudit];

export async function labHome(ctx: Omit<HomeContext, "today" | "now"> & { now?: Date }): Promise<HomeSection[]> {
  const now = ctx.now ?? new Date();
  const full: HomeContext = { ...ctx, now, today: now.toISOString().slice(0, 10) };
  const built = await Promise.all(HOME_SECTIONS.filter((s) => s.roles.includes(ctx.role)).map((s) => s.build(full)));
  return built.filter((s): s is HomeSection => s !== null);
}
