import { describe, expect, it } from "vitest";
import { canonicalTimeZone, LabSettingsSchema } from "~/lib/time-zone.ts";
import { formatDateTime } from "~/lib/dates.ts";

describe("lab time zone", () => {
  it("accepts IANA zones and UTC", () => {
    for (const zone of ["UTC", "Europe/Berlin", "America/Chicago", "Asia/Kolkata", "Pacific/Auckland"]) expect(canonicalTimeZone(zone)).toBe(zone);
  });
  it("refuses what is not an IANA zone: offsets, made-up regions, empty, markup", () => {
    for (const zone of ["+01:00", "GMT+2", "Mars/Olympus_Mons", "Europe/Nowhere", "", "<script>", "Europe/../Berlin"]) expect(canonicalTimeZone(zone), zone).toBeNull();
  });
  it("the form schema gives a clear message for a zone that is not IANA", () => {
    const parsed = LabSettingsSchema.safeParse({ timeZone: "Mars/Olympus_Mons" });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0].message).toMatch(/is not an IANA time zone/);
    expect(LabSettingsSchema.parse({ timeZone: " Europe/Berlin " }).timeZone).toBe("Europe/Berlin");
  });
  it("a time is shown in the lab's zone with the zone named", () => {
    // Source: IANA tz database, zone Europe/Berlin: UTC+1 (CET) in winter, UTC+2 (CEST) in summer.
    expect(formatDateTime("2026-12-02T13:05:00Z", "Europe/Berlin")).toBe("2 Dec 2026, 14:05 CET");
    expect(formatDateTime("2026-07-02T13:05:00Z", "Europe/Berlin")).toBe("2 Jul 2026, 15:05 CEST");
    expect(formatDateTime("2026-12-02T13:05:00Z", "UTC")).toBe("2 Dec 2026, 13:05 UTC");
  });
});
