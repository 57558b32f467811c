import "server-only";
import { headers } from "next/headers";
import { redirect } from "next/navigation";
import type { Actor, Role } from "@/features/shared/roles";
import { getActor } from "./session";

/** The signed-in person for a page, layout or server action. */
export async function getPageActor(): Promise<Actor | null> {
  return getActor(await headers());
}

/** For layouts and pages: visitors go to sign-in; the wrong role gets the forbidden page. */
export async function requirePageRole(allowed: readonly Role[], next: string): Promise<Actor> {
  const actor = await getPageActor();
  if (!actor) redirect(`/sign-in?next=${encodeURIComponent(next)}`);
  if (!allowed.includes(actor.role)) redirect("/forbidden");
  return actor;
}
