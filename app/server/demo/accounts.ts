import type { LabRole } from "../db/schema/accounts.ts";

// The invented demo lab's people: invented names, reserved .test addresses.
export const DEMO_PASSWORD = "blindcut-demo";
export const DEMO_ACCOUNTS: { email: string; name: string; role: LabRole }[] = [
  { email: "owner@demo.test", name: "Odile Marchetti (demo)", role: "owner" },
  { email: "lead@demo.test", name: "Lennart Quist (demo)", role: "lead" },
  { email: "tester@demo.test", name: "Tamsin Okoro (demo)", role: "tester" },
  { email: "tester2@demo.test", name: "Teodor Valk (demo)", role: "tester" },
  { email: "analyst@demo.test", name: "Anouk Brenner (demo)", role: "analyst" },
];
