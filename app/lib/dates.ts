// Dates and times through Intl.DateTimeFormat, one way across the app. The zone is the
// lab's (UTC until a lab sets its own) and is always shown beside a time.
export const DEFAULT_TIME_ZONE = "UTC";
const LOCALE = "en-GB";

function toDate(value: Date | string): Date {
  if (value instanceof Date) return value;
  // A calendar date (YYYY-MM-DD) is a day, not an instant: read it at UTC midnight.
  return new Date(/^\d{4}-\d{2}-\d{2}$/.test(value) ? `${value}T00:00:00Z` : value);
}

/** "2 Dec 2026". Calendar dates are shown as written, whatever the zone. */
export function formatDate(value: Date | string, timeZone = DEFAULT_TIME_ZONE): string {
  const isDay = typeof value === "string" && /^\d{4}-\d{2}-\d{2}$/.test(value);
  return new Intl.DateTimeFormat(LOCALE, { day: "numeric", month: "short", year: "numeric", timeZone: isDay ? "UTC" : timeZone }).format(toDate(value));
}

/** "2 Dec 2026, 13:05 UTC": a time always carries its zone. */
export function formatDateTime(value: Date | string, timeZone = DEFAULT_TIME_ZONE): string {
  return new Intl.DateTimeFormat(LOCALE, { day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone, timeZoneName: "short" }).format(toDate(value));
}
