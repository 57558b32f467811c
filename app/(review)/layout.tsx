import type { ReactNode } from "react";
import { requirePageRole } from "@/features/members/server";

// Review pages are for moderators and admins; checked on the server.
export default async function ReviewLayout({ children }: { children: ReactNode }) {
  await requirePageRole(["moderator", "admin"], "/review");
  return <>{children}</>;
}
