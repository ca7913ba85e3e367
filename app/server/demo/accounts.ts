import type { LabRole } from "../db/schema/accounts.ts";

// The invented demo lab's people: plainly invented role names, reserved .test addresses.
export const DEMO_PASSWORD = "blindcut-demo";
export const DEMO_ACCOUNTS: { email: string; name: string; role: LabRole }[] = [
  { email: "owner@demo.test", name: "Demo Owner", role: "owner" },
  { email: "lead@demo.test", name: "Demo Lead", role: "lead" },
  { email: "tester@demo.test", name: "Demo Tester One", role: "tester" },
  { email: "tester2@demo.test", name: "Demo Tester Two", role: "tester" },
  { email: "analyst@demo.test", name: "Demo Analyst", role: "analyst" },
];
