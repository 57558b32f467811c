/**
 * Dates and times as people read them: in the club's locale (British English, the language of every page), never as
 * ISO strings. Relative times ("3 days ago") where recency matters, always with the full date beside them for a title
 * or a <time dateTime>.
 */
export const CLUB_LOCALE = "en-GB";

type When = string | number | Date;
const toDate = (w: When) => (w instanceof Date ? w : new Date(w));

/** "2 Dec 2026" */
export function formatDay(w: When): string {
  return toDate(w).toLocaleDateString(CLUB_LOCALE, { day: "numeric", month: "short", year: "numeric" });
}

/** "2 Dec 2026, 14:05" */
export function formatDayTime(w: When): string {
  return toDate(w).toLocaleString(CLUB_LOCALE, {
    day: "numeric",
    month: "short",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
  });
}

const units: [Intl.RelativeTimeFormatUnit, number][] = [
  ["year", 365 * 86400_000],
  ["month", 30 * 86400_000],
  ["week", 7 * 86400_000],
  ["day", 86400_000],
  ["hour", 3600_000],
  ["minute", 60_000],
];

/** "3 days ago", "in 2 hours", "just now": the largest whole unit that fits. */
export function formatRelative(w: When, now: Date = new Date()): string {
  const diff = toDate(w).getTime() - now.getTime();
  const rtf = new Intl.RelativeTimeFormat(CLUB_LOCALE, { numeric: "auto" });
  for (const [unit, ms] of units) if (Math.abs(diff) >= ms) return rtf.format(Math.trunc(diff / ms), unit);
  return "just now";
}
