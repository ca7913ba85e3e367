import seedrandom from "seedrandom";
import type { Transaction } from "../db.server.ts";
import { blades, calibrationChecks, custodyEvents, instruments, media, mediaLots } from "../db/schema/index.ts";

// The demo lab's library: invented inventory numbers, media and instruments, with
// hardness readings drawn from a seeded generator. Nothing here is a real measurement.

export type DemoLibrary = {
  bladeIds: { temperLow: string[]; temperHigh: string[]; plain: string[] };
  ropeMediumId: string;
  cardMediumId: string;
  ropeLotIds: string[];
  cardLotId: string;
  testerId: string;
  cardMachineId: string;
};

const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10);

export async function loadDemoLibrary(tx: Transaction, labId: string, leadId: string): Promise<DemoLibrary> {
  const random = seedrandom("blindcut-demo-library-v1");
  const readings = (centre: number) => [0, 1, 2].map(() => Math.round((centre + (random() - 0.5) * 0.8) * 10) / 10);

  const specs = [
    ...Array.from({ length: 4 }, (_, i) => ({ group: "temperLow" as const, inv: `HV-52-${String(i + 1).padStart(3, "0")}`, steel: "AISI 52100", hrc: 62.2, ht: "Austenitized 845 °C, oil quench, tempered 2 × 2 h at 175 °C (invented demo record)" })),
    ...Array.from({ length: 4 }, (_, i) => ({ group: "temperHigh" as const, inv: `HV-52-${String(i + 5).padStart(3, "0")}`, steel: "AISI 52100", hrc: 59.6, ht: "Austenitized 845 °C, oil quench, tempered 2 × 2 h at 230 °C (invented demo record)" })),
    ...Array.from({ length: 4 }, (_, i) => ({ group: "plain" as const, inv: `HV-10-${String(i + 1).padStart(3, "0")}`, steel: "AISI 1095", hrc: 60.4, ht: "Austenitized 800 °C, brine quench, tempered 2 h at 200 °C (invented demo record)" })),
  ];
  const inserted = await tx
    .insert(blades)
    .values(
      specs.map((s) => ({
        labId,
        inventoryNumber: s.inv,
        steel: s.steel,
        hardnessHrc: readings(s.hrc),
        heatTreatment: s.ht,
        source: "Demo forge batch 7 (invented)",
        bladeLengthMm: 180,
        edgeLengthMm: 150,
        edgeThicknessMm: Math.round((0.42 + random() * 0.06) * 100) / 100,
        edgeThicknessAtMm: 3,
        edgeAngleDeg: 17,
        edgeFinish: "Fine stone finish, deburred on leather (invented)",
      })),
    )
    .returning({ id: blades.id, inventoryNumber: blades.inventoryNumber });
  const byGroup = { temperLow: [] as string[], temperHigh: [] as string[], plain: [] as string[] };
  inserted.forEach((b, i) => byGroup[specs[i].group].push(b.id));

  await tx.insert(custodyEvents).values(
    inserted.map((b) => ({ labId, bladeId: b.id, kind: "received" as const, on: daysAgo(60), holder: "Blade rack 1 (invented)", condition: "As delivered, no visible damage", recordedBy: leadId })),
  );

  const [rope] = await tx.insert(media).values({ labId, name: "Manila rope 12 mm (demo)", kind: "rope", material: "manila", sizeMm: 12, notes: "Invented demo medium" }).returning();
  const [card] = await tx.insert(media).values({ labId, name: "Silica test card (demo)", kind: "card", material: "silica-loaded card", sizeMm: 0.3, notes: "Invented demo medium" }).returning();
  const ropeLots = await tx
    .insert(mediaLots)
    .values([
      { labId, mediumId: rope.id, lotCode: "MR-2611", receivedOn: daysAgo(90), conditioning: "72 h at 50 % RH, 21 °C" },
      // The newest lot waits for its reference runs: the bench refuses it for study runs until three have ended on it.
      { labId, mediumId: rope.id, lotCode: "MR-2702", receivedOn: daysAgo(20), conditioning: "72 h at 50 % RH, 21 °C", requiredReferenceRuns: 3 },
    ])
    .returning({ id: mediaLots.id });
  const [cardLot] = await tx.insert(mediaLots).values({ labId, mediumId: card.id, lotCode: "SC-0419", receivedOn: daysAgo(45), conditioning: "Sealed pack, opened on the day of testing" }).returning({ id: mediaLots.id });

  const [tester] = await tx
    .insert(instruments)
    .values({ labId, name: "Edge-force tester 2000 gf (demo)", kind: "sharpness_tester", testMedium: "Generic test line, 0.2 mm; range 0–2000 gf, 1 gf steps (invented)", resolution: 1, maxReading: 2000, calibrationIntervalDays: 30 })
    .returning();
  const [machine] = await tx
    .insert(instruments)
    .values({ labId, name: "Card rig 1 (demo)", kind: "card_machine", testMedium: "Silica test card (invented)", resolution: 0.1, maxReading: 100, calibrationIntervalDays: 90 })
    .returning();
  await tx.insert(calibrationChecks).values([
    { labId, instrumentId: tester.id, on: daysAgo(40), referenceValue: 300, reading: 302, tolerance: 5, passed: true, recordedBy: leadId },
    { labId, instrumentId: tester.id, on: daysAgo(10), referenceValue: 300, reading: 299, tolerance: 5, passed: true, recordedBy: leadId },
    // The card rig's last check is older than its interval: it shows as lapsed.
    { labId, instrumentId: machine.id, on: daysAgo(200), referenceValue: 50, reading: 50.4, tolerance: 1, passed: true, recordedBy: leadId },
    { labId, instrumentId: machine.id, on: daysAgo(120), referenceValue: 50, reading: 50.2, tolerance: 1, passed: true, recordedBy: leadId },
  ]);

  return { bladeIds: byGroup, ropeMediumId: rope.id, cardMediumId: card.id, ropeLotIds: ropeLots.map((l) => l.id), cardLotId: cardLot.id, testerId: tester.id, cardMachineId: machine.id };
}
