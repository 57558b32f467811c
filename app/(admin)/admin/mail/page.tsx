import Link from "next/link";
import { listCaughtMail } from "@/features/mail/server";
import { Notice, PageTitle } from "@/features/shared/components/ui";
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
      <PageTitle lead="Without an SMTP server configured, Tanklore keeps every outgoing message here instead of sending it. Links in them are masked: only their recipients can use them.">Mail outbox</PageTitle>
      {usingSmtp ? (
        <Notice>Mail goes out through the configured SMTP server (SMTP_URL), so nothing is kept here.</Notice>
      ) : mail.length === 0 ? (
        <p className="text-peat-700">No message has been sent yet.</p>
      ) : (
        <table className="w-full bg-white text-left">
          <thead className="bg-peat-50">
            <tr>
              <th scope="col" className="px-3 py-2">Sent</th>
              <th scope="col" className="px-3 py-2">To</th>
              <th scope="col" className="px-3 py-2">Subject</th>
            </tr>
          </thead>
          <tbody>
            {mail.map((m) => (
              <tr key={m.id} className="border-t border-peat-100">
                <td className="px-3 py-2"><When at={m.receivedAt} relative /></td>
                <td className="px-3 py-2 [overflow-wrap:anywhere]">{m.to}</td>
                <td className="px-3 py-2">
                  <Link href={`/admin/mail/${encodeURIComponent(m.id)}`}>{m.subject}</Link>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
