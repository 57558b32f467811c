import Link from "next/link";
import type { Actor } from "@/features/shared/roles";
import { SignOutButton } from "@/features/members/components/sign-out-button";

const roleLabel = { member: "member", moderator: "moderator", admin: "club officer" } as const;

export function SiteHeader({ actor, clubName, awaiting }: { actor: Actor | null; clubName: string; awaiting: number | null }) {
  const links: { href: string; label: string }[] = [
    { href: "/evidence", label: "Evidence" },
    { href: "/planner", label: "Dose planner" },
    { href: "/cautions", label: "Cautions" },
  ];
  if (actor) links.push({ href: "/reports", label: "My reports" });
  if (awaiting !== null) links.push({ href: "/review", label: `Review (${awaiting})` });
  if (actor?.role === "admin") {
    links.push({ href: "/admin/members", label: "Members" }, { href: "/admin/catalogue", label: "Catalogue" }, { href: "/admin/settings", label: "Club settings" }, { href: "/admin/exchange", label: "Import/export" }, { href: "/admin/mail", label: "Mail outbox" });
  }
  return (
    <header className="bg-peat-900 text-peat-50 no-print">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:bg-white focus:p-2 focus:text-ink">
        Skip to content
      </a>
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3">
        <Link href="/" className="font-display text-2xl font-bold tracking-tight text-white no-underline">
          Tanklore
        </Link>
        <span className="hidden text-sm text-peat-300 sm:inline">{clubName}</span>
        <nav aria-label="Main" className="flex flex-1 flex-wrap gap-4">
          {links.map((l) => (
            <Link key={l.href} href={l.href} className="text-peat-100 hover:text-white">
              {l.label}
            </Link>
          ))}
        </nav>
        <div className="flex items-center gap-3 text-sm">
          {actor ? (
            <>
              <span data-testid="signed-in-as">
                Signed in as <strong>{actor.name}</strong> ({roleLabel[actor.role]})
              </span>
              <SignOutButton />
            </>
          ) : (
            <>
              <Link href="/sign-in" className="text-peat-100 hover:text-white">
                Sign in
              </Link>
              <Link href="/sign-up" className="rounded bg-reed-300 px-3 py-1 font-bold text-ink no-underline hover:bg-reed-100">
                Join
              </Link>
            </>
          )}
        </div>
      </div>
    </header>
  );
}
