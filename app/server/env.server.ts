import { z } from "zod";

const flag = z
  .enum(["0", "1", "true", "false"])
  .optional()
  .transform((v) => v === "1" || v === "true");

const EnvSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATABASE_URL: z.string().url({ message: "DATABASE_URL must be a postgres:// URL" }),
  SESSION_SECRET: z.string().min(32, "SESSION_SECRET must be at least 32 characters").optional(),
  APP_URL: z.string().url().optional(),
  SMTP_URL: z.string().optional(),
  MAIL_FROM: z.string().default("Blindcut <no-reply@blindcut.invalid>"),
  MAIL_CATCH_DIR: z.string().optional(),
  S3_ENDPOINT: z.string().url().optional(),
  S3_BUCKET: z.string().default("blindcut"),
  S3_REGION: z.string().default("us-east-1"),
  S3_ACCESS_KEY_ID: z.string().optional(),
  S3_SECRET_ACCESS_KEY: z.string().optional(),
  // Local runs over plain http on 127.0.0.1 cannot use Secure cookies.
  BLINDCUT_INSECURE_COOKIES: flag,
  // Demo accounts are listed on the sign-in page only when demo data is loaded.
  BLINDCUT_DEMO_ACCOUNTS: flag,
  // The caught-mail page exists only outside production, or by this explicit switch for local runs.
  BLINDCUT_DEV_MAIL: flag,
});

export type Env = z.infer<typeof EnvSchema>;

let cached: Env | undefined;

/** The validated environment; throws a message naming every bad variable. */
export function env(): Env {
  if (cached) return cached;
  const parsed = EnvSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  if (parsed.data.NODE_ENV === "production" && !parsed.data.SESSION_SECRET) {
    throw new Error("SESSION_SECRET is required in production (at least 32 characters)");
  }
  cached = parsed.data;
  return cached;
}

export function sessionSecret(): string {
  // Outside production a fixed development secret is acceptable; production refuses to start without one.
  return env().SESSION_SECRET ?? "blindcut-development-secret-not-for-production-use";
}
