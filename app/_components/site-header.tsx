import Link from "next/link";
import type { ReactNode } from "react";
import {
  ArrowLeftRight,
  Calculator,
  ChartColumn,
  ChevronDown,
  ClipboardCheck,
  Library,
  LogIn,
  Mail,
  Menu,
  NotebookPen,
  Settings,
  ShieldCheck,
  TriangleAlert,
  UserPlus,
  UserRound,
  Users,
  Activity,
} from "lucide-react";
import type { Actor } from "@/features/shared/roles";
import { SignOutButton } from "@/features/members/components/sign-out-button";
import { Disclosure } from "./disclosure";
import { LogoMark } from "./logo-mark";
import { NavLink } from "./nav-link";

const roleLabel = { member: "member", moderator: "moderator", admin: "club officer" } as const;
const icon = "h-4 w-4 shrink-0";

interface Item {
  href: string;
  label: string;
  icon: ReactNode;
}

// Desktop links underline on hover and when current; the menu's links are full-width rows.
const barLink =
  "flex items-center gap-1.5 whitespace-nowrap rounded px-1 py-1 text-peat-100 no-underline hover:text-white hover:underline aria-[current=page]:text-white aria-[current=page]:underline";
const menuLink =
  "flex items-center gap-2 rounded px-2 py-2 text-ink no-underline hover:bg-peat-50 aria-[current=page]:bg-peat-50 aria-[current=page]:font-bold";
const summaryBase =
  "flex cursor-pointer list-none items-center gap-1.5 rounded px-2 py-1 [&::-webkit-details-marker]:hidden";
const panel =
  "absolute right-0 z-30 mt-2 grid w-64 gap-1 rounded-md border border-peat-100 bg-white p-2 text-ink shadow-lg";

/**
 * The site header. From 640 px it is one row for every role (officers' pages sit in an "Admin" menu, the account in
 * its own); under 640 px the links fold into a "Menu" disclosure. Both menus are <details>, so they work without JS.
 */
export function SiteHeader({
  actor,
  clubName,
  awaiting,
}: {
  actor: Actor | null;
  clubName: string;
  awaiting: number | null;
}) {
  const main: Item[] = [
    { href: "/evidence", label: "Evidence", icon: <ChartColumn className={icon} aria-hidden="true" /> },
    { href: "/planner", label: "Dose planner", icon: <Calculator className={icon} aria-hidden="true" /> },
    { href: "/cautions", label: "Cautions", icon: <TriangleAlert className={icon} aria-hidden="true" /> },
  ];
  if (actor)
    main.push({ href: "/reports", label: "My reports", icon: <NotebookPen className={icon} aria-hidden="true" /> });
  if (awaiting !== null)
    main.push({
      href: "/review",
      label: `Review (${awaiting})`,
      icon: <ClipboardCheck className={icon} aria-hidden="true" />,
    });
  const admin: Item[] =
    actor?.role === "admin"
      ? [
          { href: "/admin/members", label: "Members", icon: <Users className={icon} aria-hidden="true" /> },
          { href: "/admin/catalogue", label: "Catalogue", icon: <Library className={icon} aria-hidden="true" /> },
          { href: "/admin/settings", label: "Club settings", icon: <Settings className={icon} aria-hidden="true" /> },
          {
            href: "/admin/exchange",
            label: "Import/export",
            icon: <ArrowLeftRight className={icon} aria-hidden="true" />,
          },
          { href: "/admin/mail", label: "Mail outbox", icon: <Mail className={icon} aria-hidden="true" /> },
          { href: "/admin/jobs", label: "Background work", icon: <Activity className={icon} aria-hidden="true" /> },
        ]
      : [];
  return (
    <header className="bg-peat-900 text-peat-50 no-print">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-40 focus:bg-white focus:p-2 focus:text-ink"
      >
        Skip to content
      </a>
      <div className="mx-auto flex max-w-6xl items-center gap-2 px-3 py-2 sm:px-4 lg:gap-5">
        <Link href="/" className="flex shrink-0 items-center gap-2 rounded text-white no-underline" title={clubName}>
          <LogoMark className="h-8 w-8" />
          {/* Between 640 and 768 px the mark alone stands for the name, to keep the bar on one row. */}
          <span className="font-display text-xl font-bold tracking-tight sm:max-md:sr-only lg:text-2xl">Tanklore</span>
        </Link>
        {/* The club's name is the logo's tooltip and heads the footer: the bar keeps its width for the links. */}

        <nav
          aria-label="Main"
          className="hidden min-w-0 flex-1 items-center gap-1 text-sm sm:flex lg:gap-3 lg:text-base"
          data-testid="nav-bar"
        >
          {main.map((l) => (
            <NavLink key={l.href} href={l.href} className={barLink}>
              <span className="hidden lg:contents">{l.icon}</span>
              {l.href === "/planner" ? (
                <>
                  {/* "Planner" alone fits the narrow bar; the full name from 1024 px. */}
                  <span className="hidden lg:inline">Dose planner</span>
                  <span className="lg:hidden">Planner</span>
                </>
              ) : (
                l.label
              )}
            </NavLink>
          ))}
          {admin.length ? (
            <Disclosure
              className="relative"
              summaryClassName={`${summaryBase} whitespace-nowrap text-peat-100 hover:text-white`}
              panelClassName={panel}
              label={
                <>
                  <ShieldCheck className={`${icon} hidden lg:block`} aria-hidden="true" />
                  Admin
                  <ChevronDown className={icon} aria-hidden="true" />
                </>
              }
            >
              <ul className="grid gap-1">
                {admin.map((l) => (
                  <li key={l.href}>
                    <NavLink href={l.href} className={menuLink}>
                      {l.icon}
                      {l.label}
                    </NavLink>
                  </li>
                ))}
              </ul>
            </Disclosure>
          ) : null}
        </nav>

        <div className="ml-auto flex min-w-0 items-center gap-2">
          {actor ? (
            <Disclosure
              className="relative min-w-0"
              summaryClassName={`${summaryBase} min-w-0 text-sm text-peat-100 hover:text-white`}
              panelClassName={panel}
              label={
                <span data-testid="signed-in-as" className="flex min-w-0 items-center gap-1.5">
                  <UserRound className={icon} aria-hidden="true" />
                  <span className="sr-only">Signed in as </span>
                  <strong className="max-w-[7rem] truncate sm:max-xl:sr-only xl:max-w-[12rem]">{actor.name}</strong>
                  <span className="sr-only"> ({roleLabel[actor.role]})</span>
                  <ChevronDown className={icon} aria-hidden="true" />
                </span>
              }
            >
              <p className="px-2 py-1 text-sm">
                Signed in as <strong>{actor.name}</strong>, {roleLabel[actor.role]}.
              </p>
              <SignOutButton className="flex w-full items-center gap-2 rounded px-2 py-2 text-left text-ink hover:bg-peat-50" />
            </Disclosure>
          ) : (
            <>
              <Link
                href="/sign-in"
                className="flex items-center gap-1.5 whitespace-nowrap text-sm text-peat-100 no-underline hover:text-white hover:underline"
              >
                <LogIn className={icon} aria-hidden="true" />
                Sign in
              </Link>
              <Link
                href="/sign-up"
                className="flex items-center gap-1.5 whitespace-nowrap rounded bg-reed-300 px-3 py-1 text-sm font-bold text-ink no-underline hover:bg-reed-100"
              >
                <UserPlus className={icon} aria-hidden="true" />
                Join
              </Link>
            </>
          )}
          <Disclosure
            className="relative sm:hidden"
            testId="header-menu"
            summaryClassName={`${summaryBase} border border-peat-500 text-sm font-bold text-white`}
            panelClassName={`${panel} max-h-[calc(100vh-4rem)] overflow-y-auto`}
            label={
              <>
                <Menu className={icon} aria-hidden="true" />
                Menu
              </>
            }
          >
            <nav aria-label="Main">
              <ul className="grid gap-1">
                {main.map((l) => (
                  <li key={l.href}>
                    <NavLink href={l.href} className={menuLink}>
                      {l.icon}
                      {l.label}
                    </NavLink>
                  </li>
                ))}
              </ul>
              {admin.length ? (
                <>
                  <p className="mt-2 border-t border-peat-100 px-2 pt-2 text-xs font-bold uppercase tracking-wide text-peat-700">
                    Club officers
                  </p>
                  <ul className="grid gap-1">
                    {admin.map((l) => (
                      <li key={l.href}>
                        <NavLink href={l.href} className={menuLink}>
                          {l.icon}
                          {l.label}
                        </NavLink>
                      </li>
                    ))}
                  </ul>
                </>
              ) : null}
            </nav>
          </Disclosure>
        </div>
      </div>
    </header>
  );
}
