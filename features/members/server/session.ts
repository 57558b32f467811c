import "server-only";
import { forbidden, unauthenticated } from "@/features/shared/errors";
import { isRole, type Actor, type Role } from "@/features/shared/roles";
import { getAuth } from "./auth";

/** The signed-in person behind a request, or null for a visitor. */
export async function getActor(headers: Headers): Promise<Actor | null> {
  const auth = await getAuth();
  const session = await auth.api.getSession({ headers });
  if (!session) return null;
  const u = session.user as typeof session.user & { role?: string | null; banned?: boolean | null };
  if (u.banned) return null;
  return { id: u.id, name: u.name, email: u.email, role: isRole(u.role) ? u.role : "member" };
}

/** Resolves the caller and checks the role; visitors get 401, the wrong role 403. */
export async function requireActor(headers: Headers, allowed?: readonly Role[], what?: string): Promise<Actor> {
  const actor = await getActor(headers);
  if (!actor) throw unauthenticated();
  if (allowed && !allowed.includes(actor.role)) throw forbidden(what);
  return actor;
}

export function assertRole(actor: Actor | null, allowed: readonly Role[], what?: string): asserts actor is Actor {
  if (!actor) throw unauthenticated();
  if (!allowed.includes(actor.role)) throw forbidden(what);
}
