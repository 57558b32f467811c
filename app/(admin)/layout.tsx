import type { ReactNode } from "react";
import { requirePageRole } from "@/features/members/server";

// The check that matters: every admin page is behind this server-side role check.
export default async function AdminLayout({ children }: { children: ReactNode }) {
  await requirePageRole(["admin"], "/admin/members");
  return <>{children}</>;
}
