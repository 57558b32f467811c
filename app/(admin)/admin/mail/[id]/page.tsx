import { BackLink } from "@/features/shared/components/back-link";
import { notFound } from "next/navigation";
import { readCaughtMail } from "@/features/mail/server";
import { getPageActor } from "@/features/members/server";
import { pageData } from "@/features/shared/server/page";
import { PageTitle } from "@/features/shared/components/ui";
import { When } from "@/features/shared/components/when";

export const metadata = { title: "Message" };

export default async function MailMessagePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const actor = await getPageActor();
  const mail = await pageData(readCaughtMail({ actor }, decodeURIComponent(id)));
  if (!mail) notFound();
  return (
    <div className="grid gap-4">
      <BackLink href="/admin/mail">All messages</BackLink>
      <PageTitle>{mail.subject}</PageTitle>
      <dl className="grid grid-cols-[max-content_1fr] gap-x-4">
        <dt className="font-bold">From</dt>
        <dd>{mail.from}</dd>
        <dt className="font-bold">To</dt>
        <dd>{mail.to}</dd>
        <dt className="font-bold">Sent</dt>
        <dd>
          <When at={mail.receivedAt} />
        </dd>
      </dl>
      <p className="text-sm text-peat-700">
        Links are shown with their keys masked (•••): they belong to the recipient, and only work from their own inbox.
      </p>
      {/* Plain text, never a live link: the masked address would not work anyway. */}
      <pre
        className="whitespace-pre-wrap rounded-md border border-peat-100 bg-white p-4 font-sans"
        data-testid="mail-text"
      >
        {mail.text}
      </pre>
    </div>
  );
}
