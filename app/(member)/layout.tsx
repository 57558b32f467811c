import type { ReactNode } from "react";
import { requirePageRole } from "@/features/members/server";

// Every page in this group needs a signed-in member; checked on the server.
export default async function MemberLayout({ children }: { children: ReactNode }) {
  await requirePageRole(["member", "moderator", "admin"], "/reports");
  return <>{children}</>;
}
