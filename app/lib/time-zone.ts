import { z } from "zod";
import { DEFAULT_TIME_ZONE } from "./dates.ts";

/** Every IANA zone this runtime knows (its canonical names), UTC first. */
export function knownTimeZones(): string[] {
  return [DEFAULT_TIME_ZONE, ...Intl.supportedValuesOf("timeZone").filter((z) => z !== DEFAULT_TIME_ZONE)];
}

/**
 * The zone's canonical IANA name, or null when it is not an IANA zone. Offsets such as
 * "+01:00" and abbreviations such as "CET" are refused: a lab names its region's zone.
 */
export function canonicalTimeZone(value: string): string | null {
  if (!/^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+)*$/.test(value)) return null;
  if (value === DEFAULT_TIME_ZONE) return DEFAULT_TIME_ZONE;
  let resolved: string;
  try {
    resolved = new Intl.DateTimeFormat("en", { timeZone: value }).resolvedOptions().timeZone;
  } catch {
    return null;
  }
  // The runtime's list holds one name per zone (Asia/Calcutta, not Asia/Kolkata): a name it
  // resolves to a listed zone is an IANA name too, and is kept as the lab wrote it.
  const known = new Set(knownTimeZones());
  return known.has(value) || (value.includes("/") && known.has(resolved)) ? value : null;
}

export const TimeZoneSchema = z
  .string({ error: "Choose the lab's time zone" })
  .trim()
  .min(1, "Choose the lab's time zone")
  .max(64, "That is not an IANA time zone: choose one from the list, for example Europe/Berlin or America/Chicago")
  .transform((value, ctx) => {
    const zone = canonicalTimeZone(value);
    if (!zone) {
      ctx.addIssue({ code: "custom", message: `"${value}" is not an IANA time zone: choose one from the list, for example Europe/Berlin or America/Chicago` });
      return z.NEVER;
    }
    return zone;
  });

export const LabSettingsSchema = z.object({ timeZone: TimeZoneSchema });
