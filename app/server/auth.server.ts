import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { sql } from "drizzle-orm";
import { z } from "zod";
import { db } from "./db.server.ts";
import { users } from "./db/schema/index.ts";
import { burnPasswordCheck, verifyPassword } from "./password.server.ts";
import { clearSignInFailures, recordSignInFailure, signInLockMinutes } from "./throttle.server.ts";

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

export type AuthenticatedUser = { id: string; email: string; name: string };

export const authenticator = new Authenticator<AuthenticatedUser>();

authenticator.use(
  new FormStrategy(async ({ form }) => {
    const parsed = SignInSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) {
      const fieldErrors: Record<string, string> = {};
      for (const issue of parsed.error.issues) fieldErrors[String(issue.path[0])] ??= issue.message;
      throw new SignInError("Check the highlighted fields", fieldErrors);
    }
    const { email, password } = parsed.data;
    const lock = await signInLockMinutes(email);
    if (lock > 0) {
      throw new SignInError(
        `Too many failed attempts for this account. Sign-in is paused for about ${lock} minute${lock === 1 ? "" : "s"}; you can also reset your password.`,
      );
    }
    const [user] = await db().select().from(users).where(sql`lower(${users.email}) = ${email}`).limit(1);
    const ok = user ? await verifyPassword(user.passwordHash, password) : (await burnPasswordCheck(password), false);
    if (!user || !ok) {
      await recordSignInFailure(email);
      throw new SignInError("That e-mail and password do not match an account.");
    }
    await clearSignInFailures(email);
    return { id: user.id, email: user.email, name: user.name };
  }),
  "form",
);

/** Only same-site paths are followed after sign-in, never another host. */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback = "/labs"): string {
  if (typeof to !== "string" || !to.startsWith("/") || to.startsWith("//") || to.startsWith("/\\")) return fallback;
  return to;
}
