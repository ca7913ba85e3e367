import type { LabRole } from "~/server/db/schema/accounts.ts";

export const ROLE_LABELS: Record<LabRole, { name: string; article: string; duty: string }> = {
  owner: { name: "Owner", article: "an owner", duty: "Manages the lab, its members and roles; every right of a lead." },
  lead: { name: "Lead", article: "a lead", duty: "Writes protocols, designs and randomizes studies, holds the keys." },
  tester: { name: "Tester", article: "a tester", duty: "Runs assigned cut tests at the bench, by blind code only." },
  analyst: { name: "Analyst", article: "an analyst", duty: "Reads the results of closed studies, blind until unblinding." },
};
