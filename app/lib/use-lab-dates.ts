import { useRouteLoaderData } from "react-router";
import { DEFAULT_TIME_ZONE, formatDate, formatDateTime } from "./dates.ts";

type RootData = { user?: { currentLab?: { timeZone?: string } | null } | null };

/** The current lab's time zone, from the app shell's data (UTC outside a lab). */
export function useLabTimeZone(): string {
  const data = useRouteLoaderData("root") as RootData | undefined;
  return data?.user?.currentLab?.timeZone ?? DEFAULT_TIME_ZONE;
}

/** The date helpers bound to the current lab's time zone. */
export function useLabDates() {
  const timeZone = useLabTimeZone();
  return {
    timeZone,
    formatDate: (value: Date | string) => formatDate(value, timeZone),
    formatDateTime: (value: Date | string) => formatDateTime(value, timeZone),
  };
}
