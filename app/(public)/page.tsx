import Link from "next/link";
import { redirect } from "next/navigation";
import { Notice } from "@/features/shared/components/ui";
import { getPageActor } from "@/features/members/server";
import { getMemberHome } from "@/features/reports/server";
import { countAwaitingReview } from "@/features/review/server";
import { canReview } from "@/features/shared/policies";
import { pageData } from "@/features/shared/server/page";
import { MemberHome } from "@/app/_components/member-home";

export default async function HomePage({
  searchParams,
}: {
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  // A confirmation link sent at sign-in returns here; when it failed, better-auth adds error=<CODE>. The sign-in page
  // says what happened and what to do, so the home page never looks like a success.
  const { error } = await searchParams;
  if (typeof error === "string" && /^[A-Z_]{3,40}$/.test(error)) redirect(`/sign-in?error=${error}`);
  const actor = await getPageActor();
  if (actor) {
    // Reports sits below review in the layer order, so the queue's count is composed here.
    const [home, queue] = await Promise.all([
      pageData(getMemberHome({ actor })),
      canReview(actor) ? countAwaitingReview({ actor }).then((count) => ({ count })) : null,
    ]);
    return <MemberHome name={actor.name} home={home} queue={queue} />;
  }
  return (
    <div className="grid gap-10">
      <section className="rounded-xl bg-peat-100 p-8">
        <h1 className="max-w-3xl text-4xl font-bold text-peat-900">What did the club&apos;s fish tolerate?</h1>
        <p className="mt-4 max-w-3xl text-lg">
          Tanklore is our club&apos;s shared record of fish-disease treatments. Members report each treatment course —
          the fish, the water, the dose and what happened — moderators check every report, and the evidence pages sum
          up, per group of fish, the concentrations that were tolerated, with intervals and counts.
        </p>
        <div className="mt-6 flex flex-wrap gap-3">
          <Link
            href="/evidence"
            className="rounded-md bg-peat-700 px-4 py-2 font-bold text-white no-underline hover:bg-peat-900"
          >
            Read the evidence
          </Link>
          <Link
            href="/planner"
            className="rounded-md border border-peat-500 bg-white px-4 py-2 font-bold text-peat-900 no-underline"
          >
            Plan a cautious dose
          </Link>
          <Link
            href="/reports/new"
            className="rounded-md border border-peat-500 bg-white px-4 py-2 font-bold text-peat-900 no-underline"
          >
            Report a treatment
          </Link>
        </div>
      </section>
      <Notice tone="caution" title="Anecdotal evidence, not advice">
        Every figure here comes from members&apos; own reports of their own tanks. Reports are checked for plausibility,
        not verified by experiment. Start with a reduced dose on a few fish, watch closely, and defer to an aquatic
        veterinarian and to local rules. <Link href="/cautions">Read the cautions</Link> before treating.
      </Notice>
      <section className="grid gap-6 md:grid-cols-3">
        <div>
          <h2 className="text-xl font-bold text-peat-900">Look up your fish</h2>
          <p className="mt-2">
            Summaries per species group and treatment: how many reports, how many fish, the tolerated range and the
            lowest dose that went badly.
          </p>
        </div>
        <div>
          <h2 className="text-xl font-bold text-peat-900">Work out the millilitres</h2>
          <p className="mt-2">
            The planner turns a target in mg/L and your tank&apos;s volume into millilitres of your stock bottle, with a
            half-strength first dose.
          </p>
        </div>
        <div>
          <h2 className="text-xl font-bold text-peat-900">Add what happened</h2>
          <p className="mt-2">
            Members log a course as it goes and report the outcome. Each accepted report makes the next keeper&apos;s
            guess a little better.
          </p>
        </div>
      </section>
    </div>
  );
}
