// The invented demo lab's protocols: a rope protocol with two published versions, a
// published card protocol, and one draft. Built through the same functions the app
// uses, inside the demo loader's transaction, so hashes and audit events are real.
import type { Transaction } from "../db.server.ts";
import { createProtocolTx, newDraftFromTx, publishVersionTx, saveDraftTx } from "../protocols.server.ts";
import { templateContent } from "~/domain/protocol.ts";

export type DemoProtocolRefs = { ropeMediumId?: string | null; cardMediumId?: string | null };

export async function loadDemoProtocols(tx: Transaction, labId: string, leadId: string, refs: DemoProtocolRefs = {}) {
  const lead = { id: leadId };

  // Rope, version 1: the common-practice template on the demo rope.
  const rope = await createProtocolTx(tx, lead, labId, { template: "rope", name: "Hand rope test (demo)" });
  const ropeV1 = {
    ...templateContent("rope", "Hand rope test (demo)"),
    medium: { mediumId: refs.ropeMediumId ?? null, description: "Manila rope, one lot per study (invented demo)" },
  };
  await saveDraftTx(tx, labId, rope.protocol.id, 1, ropeV1);
  await publishVersionTx(tx, lead, labId, rope.protocol.id, 1);

  // Rope, version 2: checks every second cut, a higher cap, a declared working-sharpness
  // horizon of 40 cuts (version 1 takes the default, its cap) and a longer finishing step.
  await newDraftFromTx(tx, lead, labId, rope.protocol.id, 1);
  const ropeV2 = {
    ...ropeV1,
    edgeForce: { ...ropeV1.edgeForce!, checkEveryCuts: 2, capCuts: 80, workingHorizonCuts: 40 },
    sharpening: ropeV1.sharpening.map((s, i) => (i === 1 ? { ...s, amount: 30 } : s)),
  };
  await saveDraftTx(tx, labId, rope.protocol.id, 2, ropeV2);
  await publishVersionTx(tx, lead, labId, rope.protocol.id, 2);

  // Card: the ISO 8442-5-style template (values from memory) on the demo card.
  const card = await createProtocolTx(tx, lead, labId, { template: "card", name: "Machine card test (demo)" });
  await saveDraftTx(tx, labId, card.protocol.id, 1, {
    ...templateContent("card", "Machine card test (demo)"),
    medium: { mediumId: refs.cardMediumId ?? null, description: "Silica-loaded test card pack (invented demo)" },
  });
  await publishVersionTx(tx, lead, labId, card.protocol.id, 1);

  // A draft: a push-cut variant still being written.
  const draft = await createProtocolTx(tx, lead, labId, { template: "blank", name: "Push cut on rope, coarse finish (demo draft)" });
  await saveDraftTx(tx, labId, draft.protocol.id, 1, {
    ...templateContent("blank", "Push cut on rope, coarse finish (demo draft)"),
    purpose: "Draft: does a coarse finish hold up under push cuts? Not yet published.",
    medium: { mediumId: refs.ropeMediumId ?? null, description: "Manila rope (invented demo)" },
  });

  return { ropeProtocolId: rope.protocol.id, cardProtocolId: card.protocol.id, draftProtocolId: draft.protocol.id };
}
