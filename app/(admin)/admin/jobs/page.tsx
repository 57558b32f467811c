import { CircleCheck } from "lucide-react";
// The rounds register when their features load, so this page (like GET /api/admin/jobs) knows every one of them.
import "@/features/reports/server";
import "@/features/review/server";
import "@/features/exchange/server";
import { getPageActor } from "@/features/members/server";
import { cardTable } from "@/features/shared/components/card-table";
import { EmptyState } from "@/features/shared/components/empty-state";
import { JobButton } from "@/features/shared/components/job-button";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { When } from "@/features/shared/components/when";
import { JOB_KINDS, jobKindLabel, jobStateLabel, jobSubject } from "@/features/shared/job-labels";
import { listJobs } from "@/features/shared/server/jobs";
import { pageData } from "@/features/shared/server/page";

export const metadata = { title: "Background work" };
export const dynamic = "force-dynamic";

const STATES = ["queued", "running", "done", "failed"] as const;
const heading = (s: string) => jobStateLabel(s).replace(/^./, (c) => c.toUpperCase());

export default async function JobsPage() {
  const actor = await getPageActor();
  // Authorized in the data layer: listJobs refuses everyone but admins, whatever the layout does.
  const { counts, failing, rounds } = await pageData(listJobs({ actor }));
  const kinds = [...new Set([...Object.keys(JOB_KINDS), ...counts.map((c) => c.kind)])].filter(
    (k) => counts.some((c) => c.kind === k) || rounds.some((r) => r.kind === k),
  );
  const count = (kind: string, status: string) => counts.find((c) => c.kind === kind && c.status === status)?.n ?? 0;
  const stuck = failing.filter((j) => j.status === "failed").length;
  return (
    <div className="grid gap-8">
      <PageTitle lead="Mails, reminders, the moderators' digest and the nightly backup run in the background: each piece of work is claimed in the database by whichever server process is free, and retried with growing delays when it fails.">
        Background work
      </PageTitle>
      {stuck ? (
        <Notice tone="alarm" title={`${stuck} job${stuck === 1 ? "" : "s"} gave up after every try.`}>
          Read the error below, mend its cause (often the mail server&rsquo;s address or password), then try it again.
        </Notice>
      ) : null}

      <section className="grid gap-3" aria-labelledby="rounds-heading">
        <h2 id="rounds-heading" className="text-xl font-bold text-peat-900">
          Rounds
        </h2>
        {rounds.length === 0 ? (
          <p className="text-peat-700">No round has been scheduled yet: they start with the server.</p>
        ) : (
          <div className={cardTable.wrap}>
            <table className={cardTable.table} data-testid="job-rounds">
              <caption className="sr-only">Recurring rounds, when each ran and runs next</caption>
              <thead className={cardTable.thead}>
                <tr>
                  <th scope="col" className={cardTable.th}>
                    Round
                  </th>
                  <th scope="col" className={cardTable.th}>
                    Last change
                  </th>
                  <th scope="col" className={cardTable.th}>
                    Next run
                  </th>
                  <th scope="col" className={cardTable.th}>
                    State
                  </th>
                  <th scope="col" className={cardTable.th}>
                    <span className="sr-only">Action</span>
                  </th>
                </tr>
              </thead>
              <tbody className={cardTable.tbody}>
                {rounds
                  .slice()
                  .sort((a, b) => jobKindLabel(a.kind).localeCompare(jobKindLabel(b.kind)))
                  .map((r) => (
                    <tr key={r.id} className={cardTable.tr}>
                      <td data-label="Round" className={cardTable.cell}>
                        <span>
                          <span className="font-bold">{jobKindLabel(r.kind)}</span>
                          <span className="block text-sm text-peat-700">{JOB_KINDS[r.kind]?.about}</span>
                        </span>
                      </td>
                      <td data-label="Last change" className={cardTable.cell}>
                        <span>
                          <When at={r.updatedAt} relative />
                        </span>
                      </td>
                      <td data-label="Next run" className={cardTable.cell}>
                        <span>{r.status === "running" ? "running now" : <When at={r.runAt} relative />}</span>
                      </td>
                      <td data-label="State" className={cardTable.cell}>
                        <span className={r.lastError ? "font-bold text-alarm-700" : undefined}>
                          {r.lastError
                            ? `last run failed (${r.attempts} ${r.attempts === 1 ? "try" : "tries"}): ${r.lastError}`
                            : "fine"}
                        </span>
                      </td>
                      <td data-label="Action" className={cardTable.cell}>
                        <span>
                          <JobButton action={{ run: r.kind }} label="Run now" what={jobKindLabel(r.kind)} />
                        </span>
                      </td>
                    </tr>
                  ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <section className="grid gap-3" aria-labelledby="failing-heading">
        <h2 id="failing-heading" className="text-xl font-bold text-peat-900">
          Failing work
        </h2>
        {failing.length === 0 ? (
          <div className="rounded-lg border border-peat-100 bg-white">
            <EmptyState icon={<CircleCheck />} title="Nothing is failing.">
              Work that fails shows here with its error, how often it was tried and when it is tried next.
            </EmptyState>
          </div>
        ) : (
          <div className={cardTable.wrap}>
            <table className={cardTable.table} data-testid="job-failures">
              <caption className="sr-only">Work with an error, newest first</caption>
              <thead className={cardTable.thead}>
                <tr>
                  <th scope="col" className={cardTable.th}>
                    Work
                  </th>
                  <th scope="col" className={cardTable.th}>
                    Tries
                  </th>
                  <th scope="col" className={cardTable.th}>
                    Error
                  </th>
                  <th scope="col" className={cardTable.th}>
                    Next
                  </th>
                </tr>
              </thead>
              <tbody className={cardTable.tbody}>
                {failing.map((j) => (
                  <tr key={j.id} className={cardTable.tr} data-testid="job-failure">
                    <td data-label="Work" className={cardTable.cell}>
                      <span className="min-w-0 break-words">
                        <span className="font-bold">{jobKindLabel(j.kind)}</span> {jobSubject(j.summary)}
                      </span>
                    </td>
                    <td data-label="Tries" className={cardTable.cell}>
                      <span>
                        {j.attempts} of {j.maxAttempts}
                      </span>
                    </td>
                    <td data-label="Error" className={cardTable.cell}>
                      <span className="min-w-0 break-words font-mono text-sm">{j.lastError ?? "—"}</span>
                    </td>
                    <td data-label="Next" className={cardTable.cell}>
                      <span>
                        {j.status === "failed" ? (
                          <JobButton action={{ retry: j.id }} label="Try again" what={jobKindLabel(j.kind)} />
                        ) : (
                          <>
                            tried again <When at={j.runAt} relative />
                          </>
                        )}
                      </span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <section className="grid gap-3" aria-labelledby="counts-heading">
        <h2 id="counts-heading" className="text-xl font-bold text-peat-900">
          All work by kind
        </h2>
        <div className={cardTable.wrap}>
          <table className={cardTable.table} data-testid="job-counts">
            <caption className="sr-only">How many jobs of each kind are in each state</caption>
            <thead className={cardTable.thead}>
              <tr>
                <th scope="col" className={cardTable.th}>
                  Kind
                </th>
                {STATES.map((s) => (
                  <th key={s} scope="col" className={`${cardTable.th} sm:text-right`}>
                    {heading(s)}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody className={cardTable.tbody}>
              {kinds.map((k) => (
                <tr key={k} className={cardTable.tr}>
                  <td data-label="Kind" className={cardTable.cell}>
                    <span className="font-bold">{jobKindLabel(k)}</span>
                  </td>
                  {STATES.map((s) => (
                    <td key={s} data-label={heading(s)} className={`${cardTable.cell} sm:text-right tabular-nums`}>
                      <span>{count(k, s).toLocaleString("en-GB")}</span>
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </div>
  );
}
