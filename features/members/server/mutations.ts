import "server-only";
import { and, count, eq, ne } from "drizzle-orm";
import { getDb, schema } from "@/db/client";
import { AppError, notFound } from "@/features/shared/errors";
import type { Actor, Role } from "@/features/shared/roles";
import { authorize, canManageMembers } from "@/features/shared/policies";
import { findMember } from "./queries";
import type { Member } from "../schemas";

const { users, roleChanges, sessions } = schema;

/** An admin changes a member's role; the change is recorded. The last admin cannot be demoted. */
export async function changeMemberRole(actor: Actor | null, userId: string, role: Role): Promise<Member> {
  authorize(actor, canManageMembers, "change members' roles");
  const db = await getDb();
  const target = await findMember(userId);
  if (!target) throw notFound("That member");
  if (target.role === role) return target;
  if (target.role === "admin") {
    const [others] = await db
      .select({ n: count() })
      .from(users)
      .where(and(eq(users.role, "admin"), ne(users.id, userId)));
    if ((others?.n ?? 0) === 0) {
      throw new AppError(
        "conflict",
        "This is the club's only admin: make someone else admin before changing this role.",
      );
    }
  }
  await db.transaction(async (tx) => {
    await tx.update(users).set({ role, updatedAt: new Date() }).where(eq(users.id, userId));
    await tx.insert(roleChanges).values({ userId, actorId: actor.id, fromRole: target.role, toRole: role });
    // Sessions carry no role (the cookie cache is off), but a demoted member signs in afresh.
    if (role === "member" || target.role === "admin") await tx.delete(sessions).where(eq(sessions.userId, userId));
  });
  return { ...target, role };
}
