// Builds a study through the app's own server modules (no shortcuts around the
// randomization), with distinctive identity strings a blinding test can search for.
import { eq } from "drizzle-orm";
import { db } from "~/server/db.server.ts";
import { blades, studies, studyArms, studyBlades, studyTesters, users } from "~/server/db/schema/index.ts";
import { createProtocolTx, publishVersionTx, saveDraftTx } from "~/server/protocols.server.ts";
import { randomizeStudyTx, startStudyTx } from "~/server/studies/randomize.server.ts";
import { templateContent } from "~/domain/protocol.ts";
import { addMember, signUp } from "./accounts.ts";
import type { AppClient } from "./app-client.ts";

export type StudyFixture = Awaited<ReturnType<typeof createStudyFixture>>;

/** Strings that must never reach a tester, or an analyst before unblinding. */
export function identityStrings(tag: string) {
  return {
    inventory: [`INV-${tag}-Q1`, `INV-${tag}-Q2`, `INV-${tag}-Q3`, `INV-${tag}-Q4`],
    steels: [`Steelzeta${tag}`, `Steeleta${tag}`],
    sources: `Sourcekappa${tag}`,
    heatTreatment: `Temperomega${tag}`,
    armNames: [`Armnamealpha${tag}`, `Armnamebeta${tag}`],
    armDescriptions: [`Armdescgamma${tag}`, `Armdescdelta${tag}`],
    hardness: "63.7 HRC",
  };
}

export async function createStudyFixture(options: { state?: "draft" | "randomized" | "running"; testers?: number; replicates?: number; cap?: number; checkEvery?: number; tag?: string; template?: "rope" | "card"; strokes?: number } = {}) {
  const tag = options.tag ?? Math.random().toString(36).slice(2, 8).toUpperCase();
  const ids = identityStrings(tag);
  const owner = await signUp("Fixture Owner");
  const lead = await addMember(owner.client, owner.labId, "lead");
  const testerClients: { client: AppClient; email: string }[] = [];
  for (let i = 0; i < (options.testers ?? 1); i++) testerClients.push(await addMember(owner.client, owner.labId, "tester", `Fixture Tester ${i + 1}`));
  const analyst = await addMember(owner.client, owner.labId, "analyst");
  const labId = owner.labId;
  const userId = async (email: string) => (await db().select({ id: users.id }).from(users).where(eq(users.email, email)))[0].id;
  const leadId = await userId(lead.email);
  const testerIds = await Promise.all(testerClients.map((t) => userId(t.email)));

  const result = await db().transaction(async (tx) => {
    const template = options.template ?? "rope";
    const { protocol } = await createProtocolTx(tx, { id: leadId }, labId, { template, name: `Short ${template} test ${tag}` });
    const content = templateContent(template, `Short ${template} test ${tag}`);
    content.replicatesPerBlade = options.replicates ?? 1;
    if (content.edgeForce) {
      content.edgeForce.checkEveryCuts = options.checkEvery ?? 2;
      content.edgeForce.capCuts = options.cap ?? 6;
    } else {
      content.card!.strokeCount = options.strokes ?? 5;
      content.card!.initialStrokes = Math.min(3, content.card!.strokeCount);
    }
    await saveDraftTx(tx, labId, protocol.id, 1, content);
    const version = await publishVersionTx(tx, { id: leadId }, labId, protocol.id, 1);

    const bladeRows = await tx
      .insert(blades)
      .values(ids.inventory.map((inv, i) => ({ labId, inventoryNumber: inv, steel: ids.steels[i % 2], hardnessHrc: [63.7], heatTreatment: ids.heatTreatment, source: ids.sources, edgeAngleDeg: 17 })))
      .returning();
    const [study] = await tx
      .insert(studies)
      .values({
        labId,
        shortName: `Fixture study ${tag}`,
        question: "Does the temper change cuts to threshold?",
        hypothesis: "The lower temper lasts longer.",
        protocolVersionId: version.id,
        design: "parallel",
        analysisPlan: { alpha: 0.05, comparisons: "all_pairs", referenceArmId: null, tests: ["welch_t", "mann_whitney", "log_rank"] },
        randomization: { method: "complete", blockSizes: [], stratifyByTester: false, sittingLength: 4, replicates: options.replicates ?? 1 },
        createdBy: leadId,
      })
      .returning();
    const arms = await tx
      .insert(studyArms)
      .values(ids.armNames.map((name, i) => ({ studyId: study.id, labId, name, description: ids.armDescriptions[i], position: i })))
      .returning();
    await tx.insert(studyBlades).values(bladeRows.map((b, i) => ({ studyId: study.id, labId, bladeId: b.id, armId: arms[i % 2].id })));
    await tx.insert(studyTesters).values(testerIds.map((id) => ({ studyId: study.id, userId: id })));
    if ((options.state ?? "running") !== "draft") await randomizeStudyTx(tx, leadId, labId, study.id, `fixture-${tag}`);
    if ((options.state ?? "running") === "running") await startStudyTx(tx, leadId, labId, study.id);
    return { studyId: study.id, protocolVersionId: version.id, armIds: arms.map((a) => a.id), bladeIds: bladeRows.map((b) => b.id) };
  });
  return { tag, ids, labId, owner, lead: { ...lead, id: leadId }, testers: testerClients.map((t, i) => ({ ...t, id: testerIds[i] })), analyst, ...result };
}
