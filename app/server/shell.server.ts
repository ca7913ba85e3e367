import { getSignedIn } from "./session.server.ts";
import type { LabRole } from "./db/schema/accounts.ts";

// What the app shell needs to know about the signed-in person: nothing more.
export type ShellUser = {
  name: string;
  currentLab: { id: string; name: string; role: LabRole; timeZone: string } | null;
  labCount: number;
  isTester: boolean; // a tester in some lab: the shell links to the bench
};

export async function getOptionalShellUser(request: Request, labId?: string): Promise<ShellUser | null> {
  const signedIn = await getSignedIn(request);
  if (!signedIn) return null;
  const labs = signedIn.memberships;
  const current = labs.find((l) => l.labId === labId) ?? (labs.length === 1 ? labs[0] : null);
  return { name: signedIn.user.name, currentLab: current ? { id: current.labId, name: current.labName, role: current.role, timeZone: current.timeZone } : null, labCount: labs.length, isTester: labs.some((l) => l.role === "tester") };
}
