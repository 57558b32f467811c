import { formatDay, formatDayTime, formatRelative } from "../format-time";

/**
 * A moment as a person reads it, with the machine-readable value in dateTime and the full date in the title.
 * `relative` shows "3 days ago" (the full date stays in the title and for screen readers via dateTime).
 */
export function When({
  at,
  relative = false,
  withTime = true,
  className,
}: {
  at: string | Date;
  relative?: boolean;
  withTime?: boolean;
  className?: string;
}) {
  const date = at instanceof Date ? at : new Date(at);
  const full = withTime ? formatDayTime(date) : formatDay(date);
  return (
    // The server and the browser may differ in time zone and by a few seconds: the browser's reading wins.
    <time dateTime={date.toISOString()} title={full} className={className} suppressHydrationWarning>
      {relative ? formatRelative(date) : full}
    </time>
  );
}
