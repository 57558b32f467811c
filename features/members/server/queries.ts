import "server-only";
import { and, asc, count, desc, eq, ilike, or, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { getDb, schema } from "@/db/client";
import type { ListMembersQuery, Member, MemberList } from "../schemas";
import { isRole } from "@/features/shared/roles";
import { authorize, canManageMembers, canSeeMember, type Caller } from "@/features/shared/policies";

const { users, roleChanges } = schema;

function toMember(u: typeof users.$inferSelect): Member {
  return {
    id: u.id,
    name: u.name,
    email: u.email,
    role: isRole(u.role) ? u.role : "member",
    emailVerified: u.emailVerified,
    isDemo: u.isDemo,
    createdAt: u.createdAt.toISOString(),
  };
}

/** The club's members, for admins: search, role filter, sort, pages. */
export async function getMembers({ actor }: Caller, q: ListMembersQuery): Promise<MemberList> {
  authorize(actor, canManageMembers, "list the club's members");
  const db = await getDb();
  const where: SQL[] = [];
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.push(or(ilike(users.name, like), ilike(users.email, like))!);
  }
  if (q.role) where.push(eq(users.role, q.role));
  const cond = where.length ? and(...where) : undefined;
  const column = { name: users.name, email: users.email, role: users.role, createdAt: users.createdAt }[q.sort];
  const order = q.dir === "desc" ? desc(column) : asc(column);
  const [rows, [total]] = await Promise.all([
    db
      .select()
      .from(users)
      .where(cond)
      .orderBy(order, asc(users.id))
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db.select({ n: count() }).from(users).where(cond),
  ]);
  return { members: rows.map(toMember), total: total?.n ?? 0, page: q.page, pageSize: q.pageSize };
}

/** A member's account: their own, or anyone's for an admin; null when there is none. */
export async function getMemberById({ actor }: Caller, id: string): Promise<Member | null> {
  authorize(actor, (a) => canSeeMember(a, id), "see other members' accounts");
  return findMember(id);
}

/** Unchecked lookup for this feature's own writes, after they have checked the caller. */
export async function findMember(id: string): Promise<Member | null> {
  const db = await getDb();
  const [row] = await db.select().from(users).where(eq(users.id, id)).limit(1);
  return row ? toMember(row) : null;
}

/** The role-change log (one member's, or everyone's), newest first, for admins. */
export async function getRoleChangesByUserId({ actor }: Caller, userId?: string, limit = 50) {
  authorize(actor, canManageMembers, "see the role-change log");
  const db = await getDb();
  const changer = alias(users, "actor");
  const member = alias(users, "member");
  const rows = await db
    .select({
      id: roleChanges.id,
      userId: roleChanges.userId,
      memberName: member.name,
      fromRole: roleChanges.fromRole,
      toRole: roleChanges.toRole,
      actorName: changer.name,
      at: roleChanges.at,
    })
    .from(roleChanges)
    .leftJoin(changer, eq(changer.id, roleChanges.actorId))
    .innerJoin(member, eq(member.id, roleChanges.userId))
    .where(userId ? eq(roleChanges.userId, userId) : undefined)
    .orderBy(desc(roleChanges.at), desc(roleChanges.id))
    .limit(limit);
  return rows.map((r) => ({ ...r, at: r.at.toISOString() }));
}
