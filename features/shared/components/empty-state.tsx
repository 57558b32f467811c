import type { ReactNode } from "react";

/**
 * What a list shows when it has nothing in it: an icon, one sentence on why it is empty, and the next thing to do.
 * `icon` is a decorative element (e.g. a lucide icon with aria-hidden); `action` a link or button.
 */
export function EmptyState({
  icon,
  title,
  children,
  action,
}: {
  icon: ReactNode;
  title: string;
  children?: ReactNode;
  action?: ReactNode;
}) {
  return (
    <div className="flex flex-col items-center gap-2 px-4 py-8 text-center" data-testid="empty-state">
      <span
        className="flex h-12 w-12 items-center justify-center rounded-full bg-peat-50 text-peat-700 [&>svg]:h-6 [&>svg]:w-6"
        aria-hidden="true"
      >
        {icon}
      </span>
      <p className="font-bold text-peat-900">{title}</p>
      {children ? <p className="max-w-prose text-sm text-peat-700">{children}</p> : null}
      {action ? <div className="mt-1 flex flex-wrap justify-center gap-3">{action}</div> : null}
    </div>
  );
}

/** Class names for a link that acts as the empty state's main action. */
export const emptyActionClass =
  "inline-flex items-center gap-1.5 rounded-md bg-peat-700 px-4 py-2 font-bold text-white no-underline hover:bg-peat-900";
export const emptyQuietActionClass =
  "inline-flex items-center gap-1.5 rounded-md border border-peat-500 bg-white px-4 py-2 font-bold text-peat-900 no-underline hover:bg-peat-50";
