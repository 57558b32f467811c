import Link from "next/link";
import type { MemberHome as Home } from "@/features/reports/server";
import { DueTime } from "@/features/reports/components/course-log";
import { doseAmountText } from "@/features/reports/components/dose-amount";
import type { ReactNode } from "react";
import { CalendarClock, FilePenLine, Gavel, Undo2 } from "lucide-react";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";

const decisionWords: Record<string, string> = {
  accept: "accepted",
  return: "returned for changes",
  decline: "declined",
  retract: "retracted",
};
const day = (iso: string) => new Date(iso).toLocaleDateString("en-GB", { dateStyle: "medium" });
const round = (n: number, digits: number) => n.toLocaleString("en-GB", { maximumFractionDigits: digits });

function Section({
  title,
  testId,
  empty,
  children,
  count,
}: {
  title: string;
  testId: string;
  empty: ReactNode;
  children: ReactNode;
  count: number;
}) {
  return (
    <section className="grid min-w-0 gap-2" data-testid={testId}>
      <h2 className="text-xl font-bold text-peat-900">{title}</h2>
      {count === 0 ? (
        <div className="rounded-lg border border-peat-100 bg-white">{empty}</div>
      ) : (
        <ul className="grid gap-2">{children}</ul>
      )}
    </section>
  );
}

/** The signed-in member's start page: what needs doing next, nearest first. */
export function MemberHome({ name, home, queue }: { name: string; home: Home; queue: { count: number } | null }) {
  return (
    <div className="grid gap-8">
      <div className="grid gap-2">
        <h1 className="text-3xl font-bold text-peat-900">Welcome back, {name}</h1>
        <div className="flex flex-wrap gap-3">
          <Link href="/planner" className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white no-underline">
            Plan a cautious dose
          </Link>
          <Link
            href="/reports/new"
            className="rounded-md border border-peat-500 bg-white px-4 py-2 font-bold text-peat-900 no-underline"
          >
            Report a treatment
          </Link>
          <Link
            href="/evidence"
            className="rounded-md border border-peat-500 bg-white px-4 py-2 font-bold text-peat-900 no-underline"
          >
            Read the evidence
          </Link>
        </div>
      </div>

      {queue ? (
        <section className="grid gap-1 rounded-lg border-2 border-peat-500 bg-white p-4" data-testid="home-queue">
          <h2 className="text-xl font-bold text-peat-900">Review queue</h2>
          <p>
            {queue.count === 0
              ? "No reports wait for review."
              : `${queue.count} report${queue.count === 1 ? "" : "s"} wait${queue.count === 1 ? "s" : ""} for review.`}{" "}
            {home.oldestAwaiting ? (
              <>
                The oldest: <Link href={`/review/${home.oldestAwaiting.id}`}>{home.oldestAwaiting.title}</Link>
                {home.oldestAwaiting.submittedAt ? `, submitted ${day(home.oldestAwaiting.submittedAt)}` : ""}.
              </>
            ) : null}{" "}
            <Link href="/review">Open the queue</Link>
          </p>
        </section>
      ) : null}

      <Section
        title="Open treatment courses"
        testId="home-courses"
        count={home.openCourses.length}
        empty={
          <EmptyState
            icon={<CalendarClock />}
            title="No course is open."
            action={
              <Link href="/planner" className={emptyQuietActionClass}>
                Plan a dose
              </Link>
            }
          >
            A course log reminds you when each dose is due. Start one from the planner when you treat.
          </EmptyState>
        }
      >
        {home.openCourses.map((c) => (
          <li key={c.id} className="min-w-0 break-words">
            <Link href={`/reports/${c.id}`} className="font-bold">
              {c.title}
            </Link>
            {" — "}
            {c.nextDose ? (
              <>
                {c.nextDose.first ? (
                  "first dose due now"
                ) : (
                  <>
                    next dose <DueTime at={c.nextDose.at} />
                  </>
                )}
                : {doseAmountText(c.nextDose)}
                {c.nextDose.concentration != null
                  ? `, making ${round(c.nextDose.concentration, 2)} ${c.nextDose.unit}`
                  : ""}
              </>
            ) : c.watchUntil ? (
              <>no further dose; watch until {day(c.watchUntil)}, then record the outcome</>
            ) : (
              "no dose planned yet"
            )}
          </li>
        ))}
      </Section>

      <Section
        title="Returned for changes"
        testId="home-returned"
        count={home.returned.length}
        empty={
          <EmptyState icon={<Undo2 />} title="Nothing is waiting for your changes.">
            When a moderator asks you to fix a report, it appears here with their note.
          </EmptyState>
        }
      >
        {home.returned.map((r) => (
          <li key={r.id} className="min-w-0 break-words">
            <Link href={`/reports/${r.id}/edit`} className="font-bold">
              {r.title}
            </Link>
            {r.note ? <> — the moderator&apos;s note: “{r.note}”</> : null}
          </li>
        ))}
      </Section>

      <Section
        title="Drafts"
        testId="home-drafts"
        count={home.drafts.length}
        empty={
          <EmptyState
            icon={<FilePenLine />}
            title="No drafts."
            action={
              <Link href="/reports/new" className={emptyQuietActionClass}>
                Report a treatment
              </Link>
            }
          >
            A report you start and leave unfinished is kept here until you submit it.
          </EmptyState>
        }
      >
        {home.drafts.map((d) => (
          <li key={d.id} className="min-w-0 break-words">
            <Link href={`/reports/${d.id}/edit`} className="font-bold">
              {d.title}
            </Link>{" "}
            — last changed {day(d.updatedAt)}
          </li>
        ))}
      </Section>

      <Section
        title="Recent decisions on your reports"
        testId="home-decisions"
        count={home.recentDecisions.length}
        empty={
          <EmptyState
            icon={<Gavel />}
            title="No decisions yet."
            action={
              <Link href="/reports" className={emptyQuietActionClass}>
                See my reports
              </Link>
            }
          >
            Once a moderator accepts, returns or declines one of your submitted reports, it is listed here.
          </EmptyState>
        }
      >
        {home.recentDecisions.map((d, i) => (
          <li key={i} className="min-w-0 break-words">
            <Link href={`/reports/${d.reportId}`} className="font-bold">
              {d.title}
            </Link>{" "}
            — {decisionWords[d.action] ?? d.action} on {day(d.at)}
            {d.note ? <> — “{d.note}”</> : null}
          </li>
        ))}
      </Section>

      <p className="text-sm text-peat-700">
        Every figure here comes from members&apos; own reports and is anecdotal. Start low, watch closely, and defer to
        an aquatic vet. <Link href="/cautions">Read the cautions</Link>.
      </p>
    </div>
  );
}
