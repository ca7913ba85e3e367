import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { sql } from "drizzle-orm";
import { z } from "zod";
import { db } from "./db.server.ts";
import { users } from "./db/schema/index.ts";
import { burnPasswordCheck, verifyPassword } from "./password.server.ts";
import { beginSignInAttempt, signInSucceeded } from "./throttle.server.ts";

export const SignInSchema = z.object({
  email: z.string().trim().toLowerCase().email("Enter the e-mail address you signed up with"),
  password: z.string().min(1, "Enter your password"),
  redirectTo: z.string().optional(),
});

/** A sign-in refused for a reason the form shows beside its fields. */
export class SignInError extends Error {
  constructor(
    message: string,
    readonly fieldErrors: Record<string, string> = {},
  ) {
    super(message);
  }
}

/** The header of the internal request the sign-in route hands to the strategy. */
export const CLIENT_ADDRESS_HEADER = "x-blindcut-client-address";

export type AuthenticatedUser = { id: string; email: string; name: string };

export const authenticator = new Authenticator<AuthenticatedUser>();

authenticator.use(
  new FormStrategy(async ({ form, request }) => {
    const parsed = SignInSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) {
      const fieldErrors: Record<string, string> = {};
      for (const issue of parsed.error.issues) fieldErrors[String(issue.path[0])] ??= issue.message;
      throw new SignInError("Check the highlighted fields", fieldErrors);
    }
    const { email, password } = parsed.data;
    // Set by the sign-in route from the server's view of the client, never from the sender's headers.
    const clientAddress = request.headers.get(CLIENT_ADDRESS_HEADER) ?? "unknown";
    const gate = await beginSignInAttempt(email, clientAddress);
    if (!gate.ok) {
      const wait = `about ${gate.minutes} minute${gate.minutes === 1 ? "" : "s"}`;
      throw new SignInError(
        gate.scope === "account"
          ? `Too many failed attempts for this account. Sign-in is paused for ${wait}; resetting your password lifts the pause now.`
          : `Too many failed sign-ins from your network. Try again in ${wait}.`,
      );
    }
    const [user] = await db().select().from(users).where(sql`lower(${users.email}) = ${email}`).limit(1);
    const ok = user ? await verifyPassword(user.passwordHash, password) : (await burnPasswordCheck(password), false);
    if (!user || !ok) throw new SignInError("That e-mail and password do not match an account.");
    await signInSucceeded(email);
    return { id: user.id, email: user.email, name: user.name };
  }),
  "form",
);

const REDIRECT_BASE = "http://blindcut.invalid";

/**
 * Only a path on this site is followed after sign-in: no control characters, no
 * backslashes, no `//`, and it must parse (with the URL parser, as a browser would)
 * to this origin. Anything else goes to the fallback (the role's home).
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = "/labs"): string {
  if (typeof to !== "string" || !to.startsWith("/")) return fallback;
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f\\]/.test(to) || to.includes("//")) return fallback;
  let parsed: URL;
  try {
    parsed = new URL(to, REDIRECT_BASE);
  } catch {
    return fallback;
  }
  if (parsed.origin !== REDIRECT_BASE) return fallback;
  return `${parsed.pathname}${parsed.search}${parsed.hash}`;
}
