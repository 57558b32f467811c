"use client";

import { ChevronLeft, ChevronRight, Keyboard } from "lucide-react";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useId, useState } from "react";
import { useShortcuts } from "@/features/shared/components/use-shortcuts";

export interface Shortcut {
  keys: string[];
  does: string;
}

/** The shortcut list, always reachable from a visible button (and "?"), so the keys are never a secret. */
export function ShortcutHelp({
  shortcuts,
  open,
  onToggle,
}: {
  shortcuts: Shortcut[];
  open: boolean;
  onToggle: () => void;
}) {
  const id = useId();
  return (
    <div className="grid gap-2" data-testid="shortcut-help">
      <button
        type="button"
        aria-expanded={open}
        aria-controls={id}
        onClick={onToggle}
        className="inline-flex w-fit items-center gap-1.5 rounded-md border border-peat-300 bg-white px-3 py-1.5 text-sm"
      >
        <Keyboard className="h-4 w-4" aria-hidden="true" />
        Keyboard shortcuts <kbd className="rounded border border-peat-300 bg-peat-50 px-1 font-sans">?</kbd>
      </button>
      <div id={id} hidden={!open} className="rounded-md border border-peat-100 bg-white p-3 text-sm">
        <dl className="grid grid-cols-[max-content_minmax(0,1fr)] gap-x-4 gap-y-1">
          {shortcuts.map((s) => (
            <div key={s.does} className="contents">
              <dt>
                {s.keys.map((k, i) => (
                  <span key={k}>
                    {i ? " or " : ""}
                    <kbd className="rounded border border-peat-300 bg-peat-50 px-1.5 font-sans">{k}</kbd>
                  </span>
                ))}
              </dt>
              <dd>{s.does}</dd>
            </div>
          ))}
        </dl>
        <p className="mt-2 text-peat-700">
          Shortcuts do nothing while you type in a field. No key makes a decision: that is always a choice in the form.
        </p>
      </div>
    </div>
  );
}

const reviewShortcuts: Shortcut[] = [
  { keys: ["j", "n"], does: "next report in the queue" },
  { keys: ["k", "p"], does: "previous report in the queue" },
  { keys: ["u"], does: "back to the queue" },
  { keys: ["?"], does: "show or hide this list" },
];

/** On a report under review: its place in the queue, links to its neighbours, and j/k (n/p) to reach them. */
export function ReviewQueueNav({
  prevId,
  nextId,
  position,
  total,
}: {
  prevId: string | null;
  nextId: string | null;
  position: number | null;
  total: number;
}) {
  const router = useRouter();
  const [help, setHelp] = useState(false);
  const go = (id: string | null) => id && router.push(`/review/${id}`);
  useShortcuts({
    j: () => go(nextId),
    n: () => go(nextId),
    k: () => go(prevId),
    p: () => go(prevId),
    u: () => router.push("/review"),
    "?": () => setHelp((h) => !h),
    Escape: () => setHelp(false),
  });
  const link =
    "inline-flex items-center gap-1 rounded-md border border-peat-300 bg-white px-3 py-1.5 text-sm no-underline";
  return (
    <nav aria-label="Review queue" className="grid gap-2 no-print" data-testid="review-queue-nav">
      <div className="flex flex-wrap items-center gap-2">
        <Link href="/review" className="mr-auto">
          Review queue
        </Link>
        <span className="text-sm text-peat-700">
          {position ? `Report ${position} of ${total} waiting` : `${total} waiting`}
        </span>
        {prevId ? (
          <Link href={`/review/${prevId}`} className={link} aria-keyshortcuts="k p">
            <ChevronLeft className="h-4 w-4" aria-hidden="true" />
            Previous{" "}
            <kbd aria-hidden="true" className="font-sans text-peat-700">
              k
            </kbd>
          </Link>
        ) : null}
        {nextId ? (
          <Link href={`/review/${nextId}`} className={link} aria-keyshortcuts="j n">
            Next{" "}
            <kbd aria-hidden="true" className="font-sans text-peat-700">
              j
            </kbd>
            <ChevronRight className="h-4 w-4" aria-hidden="true" />
          </Link>
        ) : null}
      </div>
      <ShortcutHelp shortcuts={reviewShortcuts} open={help} onToggle={() => setHelp((h) => !h)} />
    </nav>
  );
}
