import "server-only";
import { headers } from "next/headers";
import { redirect } from "next/navigation";
import type { Actor, Role } from "@/features/shared/roles";
import { getActor } from "./session";

/** The signed-in person for a page, layout or server action. */
export async function getPageActor(): Promise<Actor | null> {
  return getActor(await headers());
}

/** The header proxy.ts sets to the page's own path and query (a client-sent one is overwritten there). */
export const PAGE_PATH_HEADER = "x-tanklore-page-path";

/**
 * For layouts and pages: visitors go to sign-in and come back to the page they asked for (layouts do not know
 * it, so proxy.ts passes it along; `fallback` serves when it is missing); the wrong role gets the forbidden page.
 */
export async function requirePageRole(allowed: readonly Role[], fallback: string): Promise<Actor> {
  const h = await headers();
  const actor = await getActor(h);
  const asked = h.get(PAGE_PATH_HEADER);
  const next = asked && asked.startsWith("/") && !asked.startsWith("//") ? asked : fallback;
  if (!actor) redirect(`/sign-in?next=${encodeURIComponent(next)}`);
  if (!allowed.includes(actor.role)) redirect("/forbidden");
  return actor;
}
