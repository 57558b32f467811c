import Link from "next/link";
import type { ReactNode } from "react";
import { requirePageRole } from "@/features/members/server";

// Review pages are for moderators and admins; checked on the server.
export default async function ReviewLayout({ children }: { children: ReactNode }) {
  await requirePageRole(["moderator", "admin"], "/review");
  return (
    <div className="grid gap-6">
      <nav aria-label="Review" className="flex flex-wrap gap-4 border-b border-peat-100 pb-2">
        <Link href="/review">Review queue</Link>
        <Link href="/review/reports">All reports</Link>
      </nav>
      {children}
    </div>
  );
}
