import { z } from "zod";
import { roles } from "@/features/shared/roles";

export const roleSchema = z.enum(roles, { error: "Role must be one of member, moderator or admin." });

export const changeRoleSchema = z.object({ role: roleSchema }).strict();

/** The body of the sign-in library's POST /api/auth/admin/set-role, which the app serves itself. */
export const setRoleSchema = z
  .object({ userId: z.string({ error: "userId names the member." }).min(1, "userId names the member.").max(200), role: roleSchema })
  .strict();

export const memberSortKeys = ["name", "email", "role", "createdAt"] as const;

export const listMembersQuerySchema = z.object({
  q: z.string().trim().max(100, "Search text is at most 100 characters.").optional(),
  role: roleSchema.optional(),
  sort: z.enum(memberSortKeys, { error: "sort must be name, email, role or createdAt." }).default("name"),
  dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc." }).default("asc"),
  page: z.coerce.number({ error: "page must be a number." }).int().min(1, "page starts at 1.").default(1),
  pageSize: z.coerce.number({ error: "pageSize must be a number." }).int().min(1).max(100, "pageSize is at most 100.").default(20),
});

export const memberSchema = z.object({
  id: z.string(),
  name: z.string(),
  email: z.string(),
  role: roleSchema,
  emailVerified: z.boolean(),
  isDemo: z.boolean(),
  createdAt: z.string(),
});

export const memberListSchema = z.object({
  members: z.array(memberSchema),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
});

export const roleChangeSchema = z.object({
  id: z.number().int(),
  userId: z.string(),
  fromRole: z.string(),
  toRole: z.string(),
  actorName: z.string().nullable(),
  at: z.string(),
});

export type Member = z.infer<typeof memberSchema>;
export type MemberList = z.infer<typeof memberListSchema>;
export type ListMembersQuery = z.infer<typeof listMembersQuerySchema>;
