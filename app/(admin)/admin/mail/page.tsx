import Link from "next/link";
import { listCaughtMail } from "@/features/mail/server";
import { Inbox } from "lucide-react";
import { Notice, PageTitle } from "@/features/shared/components/ui";
import { EmptyState, emptyQuietActionClass } from "@/features/shared/components/empty-state";
import { cardTable } from "@/features/shared/components/card-table";
import { getEnv } from "@/features/shared/env";
import { getPageActor } from "@/features/members/server";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";

export const metadata = { title: "Mail outbox" };

export default async function MailPage() {
  const actor = await getPageActor();
  // Asked even with SMTP on, so the page refuses everyone but admins in the same way.
  const kept = await pageData(listCaughtMail({ actor }, 200));
  const usingSmtp = Boolean(getEnv().SMTP_URL);
  const mail = usingSmtp ? [] : kept;
  return (
    <div className="grid gap-6">
      <PageTitle lead="Without an SMTP server configured, Tanklore keeps every outgoing message here instead of sending it. Links in them are masked: only their recipients can use them.">
        Mail outbox
      </PageTitle>
      {usingSmtp ? (
        <Notice>Mail goes out through the configured SMTP server (SMTP_URL), so nothing is kept here.</Notice>
      ) : mail.length === 0 ? (
        <div className="rounded-lg border border-peat-100 bg-white">
          <EmptyState
            icon={<Inbox />}
            title="No message has been sent yet."
            action={
              <Link href="/admin/members" className={emptyQuietActionClass}>
                See the members
              </Link>
            }
          >
            Messages land here when someone joins, asks to reset a password, or when moderators are sent their digest of
            waiting reports.
          </EmptyState>
        </div>
      ) : (
        <div className={cardTable.wrap}>
          <table className={cardTable.table}>
            <caption className="sr-only">Messages kept instead of sent, newest first</caption>
            <thead className={cardTable.thead}>
              <tr>
                <th scope="col" className={cardTable.th}>
                  Sent
                </th>
                <th scope="col" className={cardTable.th}>
                  To
                </th>
                <th scope="col" className={cardTable.th}>
                  Subject
                </th>
              </tr>
            </thead>
            <tbody className={cardTable.tbody}>
              {mail.map((m) => (
                <tr key={m.id} className={cardTable.tr}>
                  <td data-label="Sent" className={cardTable.cell}>
                    <span>
                      <When at={m.receivedAt} relative />
                    </span>
                  </td>
                  <td data-label="To" className={cardTable.cell}>
                    <span className="break-all">{m.to}</span>
                  </td>
                  <td data-label="Subject" className={cardTable.cell}>
                    <span className="min-w-0">
                      <Link href={`/admin/mail/${encodeURIComponent(m.id)}`}>{m.subject}</Link>
                    </span>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
