import type { Metadata } from "next";
import { Suspense, type ReactNode } from "react";
import { connection } from "next/server";
import "./globals.css";
import { bodyFont, displayFont } from "./fonts";
import Link from "next/link";
import { Info } from "lucide-react";
import { SiteHeader } from "./_components/site-header";
import { LogoMark } from "./_components/logo-mark";
import { QueryProvider } from "@/features/shared/components/query-provider";
import { ANECDOTAL_NOTICE } from "@/features/shared/components/ui";
import { getPageActor } from "@/features/members/server";
import { getClubSettings, hasDemoData } from "@/features/catalogue/server";
import { countAwaitingReview } from "@/features/review/server";
import { canReview } from "@/features/shared/roles";

export const metadata: Metadata = {
  title: { default: "Tanklore", template: "%s · Tanklore" },
  description:
    "A fishkeeping club's moderated registry of treatment outcomes, with evidence summaries and a dose planner.",
};

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Every page reads the session and the club's name: render per request, never at build time.
  await connection();
  const [club, demo] = await Promise.all([getClubSettings(), hasDemoData()]);
  return (
    <html lang="en" className={`${bodyFont.variable} ${displayFont.variable}`}>
      <body className="min-h-screen bg-paper font-sans text-ink antialiased">
        <QueryProvider>
          {/* The session is read apart: the page streams without waiting for it (the public evidence pages come from
              the cache), the header as a visitor sees it standing in until the signed-in one arrives. */}
          <Suspense fallback={<SiteHeader actor={null} clubName={club.name} awaiting={null} />}>
            <SignedInHeader clubName={club.name} />
          </Suspense>
          {demo ? (
            <p className="bg-reed-100 px-4 py-1 text-center text-sm text-reed-700 no-print" data-testid="demo-banner">
              Demo club: every member, report and figure here is invented for trying Tanklore out.
            </p>
          ) : null}
          <main id="main" className="mx-auto max-w-6xl px-4 py-8">
            {children}
          </main>
          <footer className="mx-auto grid max-w-6xl gap-2 border-t border-peat-100 px-4 py-6 text-sm text-peat-700">
            <p className="flex items-center gap-2 font-bold text-peat-900">
              <LogoMark className="h-5 w-5" />
              {club.name}
            </p>
            <p className="flex gap-2">
              <Info className="mt-0.5 h-4 w-4 shrink-0" aria-hidden="true" />
              <span>{ANECDOTAL_NOTICE}</span>
            </p>
            <p>
              Defer to an aquatic veterinarian and to local rules on animal medicines and on disposing of treated water.{" "}
              <Link href="/cautions">Read the cautions</Link>.
            </p>
          </footer>
        </QueryProvider>
      </body>
    </html>
  );
}

async function SignedInHeader({ clubName }: { clubName: string }) {
  const actor = await getPageActor();
  const awaiting = canReview(actor) ? await countAwaitingReview({ actor }) : null;
  return <SiteHeader actor={actor} clubName={clubName} awaiting={awaiting} />;
}
