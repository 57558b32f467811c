import Link from "next/link";
import { notFound } from "next/navigation";
import { readCaughtMail } from "@/features/mail/server";
import { PageTitle } from "@/features/shared/components/ui";

export const metadata = { title: "Message" };

function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/\S+)/g);
  return (
    <pre className="whitespace-pre-wrap rounded-md border border-peat-100 bg-white p-4 font-sans">
      {parts.map((p, i) => (/^https?:\/\//.test(p) ? <a key={i} href={p}>{p}</a> : p))}
    </pre>
  );
}

export default async function MailMessagePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const mail = await readCaughtMail(decodeURIComponent(id));
  if (!mail) notFound();
  return (
    <div className="grid gap-4">
      <p><Link href="/admin/mail">← All messages</Link></p>
      <PageTitle>{mail.subject}</PageTitle>
      <dl className="grid grid-cols-[max-content_1fr] gap-x-4">
        <dt className="font-bold">From</dt><dd>{mail.from}</dd>
        <dt className="font-bold">To</dt><dd>{mail.to}</dd>
        <dt className="font-bold">Sent</dt><dd>{new Date(mail.receivedAt).toLocaleString("en-GB")}</dd>
      </dl>
      <Linkified text={mail.text} />
    </div>
  );
}
