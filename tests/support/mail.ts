// Reads mail caught by the local SMTP server during tests.
import { readdirSync, readFileSync, existsSync } from "node:fs";
import path from "node:path";

export type CaughtMail = { to: string[]; subject: string; text: string; html: string };

export async function waitForMail(dir: string, to: string, match: RegExp = /./, timeoutMs = 10_000): Promise<CaughtMail> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (existsSync(dir)) {
      const mails = readdirSync(dir)
        .filter((f) => f.endsWith(".json"))
        .sort()
        .reverse()
        .map((f) => JSON.parse(readFileSync(path.join(dir, f), "utf8")) as CaughtMail)
        .filter((m) => m.to.includes(to.toLowerCase()) && match.test(m.subject));
      if (mails[0]) return mails[0];
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to} matching ${match} within ${timeoutMs} ms`);
}

export function firstLink(mail: CaughtMail): string {
  const link = mail.text.match(/https?:\/\/\S+/)?.[0];
  if (!link) throw new Error(`mail "${mail.subject}" has no link`);
  return link;
}
