import { z } from "zod";
import { roles } from "@/features/shared/roles";

export const roleSchema = z.enum(roles, { error: "Role must be one of member, moderator or admin." });

export const changeRoleSchema = z.object({ role: roleSchema }).strict();

/** The body of the sign-in library's POST /api/auth/admin/set-role, which the app serves itself. */
export const setRoleSchema = z
  .object({
    userId: z.string({ error: "userId names the member." }).min(1, "userId names the member.").max(200),
    role: roleSchema,
  })
  .strict();

export const memberSortKeys = ["name", "email", "role", "createdAt"] as const;

export const listMembersQuerySchema = z.object({
  q: z.string().trim().max(100, "Search text is at most 100 characters.").optional(),
  role: roleSchema.optional(),
  sort: z.enum(memberSortKeys, { error: "sort must be name, email, role or createdAt." }).default("name"),
  dir: z.enum(["asc", "desc"], { error: "dir must be asc or desc." }).default("asc"),
  page: z.coerce.number({ error: "page must be a number." }).int().min(1, "page starts at 1.").default(1),
  pageSize: z.coerce
    .number({ error: "pageSize must be a number." })
    .int()
    .min(1)
    .max(100, "pageSize is at most 100.")
    .default(20),
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

// ---- Signing in and joining: the sign-in library's own limits, written once for its settings and the forms. ----

/** better-auth's emailAndPassword.minPasswordLength / maxPasswordLength (features/members/server/auth.ts). */
export const PASSWORD_MIN_LENGTH = 10;
export const PASSWORD_MAX_LENGTH = 128;
/** The auth gateway's field limits (features/members/server/auth-gateway.ts). */
export const NAME_MAX_LENGTH = 100;
export const EMAIL_MAX_LENGTH = 254;

const emailField = z
  .string({ error: "Give your e-mail address." })
  .trim()
  .min(1, "Give your e-mail address.")
  .max(EMAIL_MAX_LENGTH, `An e-mail address is at most ${EMAIL_MAX_LENGTH} characters.`)
  .pipe(z.email("That is not an e-mail address: check it for typos (it looks like name@example.org)."));
const newPassword = z
  .string({ error: `Choose a password of at least ${PASSWORD_MIN_LENGTH} characters.` })
  .min(PASSWORD_MIN_LENGTH, `Choose a password of at least ${PASSWORD_MIN_LENGTH} characters.`)
  .max(PASSWORD_MAX_LENGTH, `A password is at most ${PASSWORD_MAX_LENGTH} characters.`);
const samePasswordTwice = (d: { password: string; confirm: string }) => d.password === d.confirm;
const differ = { path: ["confirm"], message: "The two passwords differ. Type the same password twice." };

export const signInSchema = z.object({
  email: emailField,
  // Any length: a password chosen under older limits still signs in.
  password: z.string({ error: "Give your password." }).min(1, "Give your password."),
});

export const signUpSchema = z
  .object({
    name: z
      .string({ error: "Give a display name." })
      .trim()
      .min(1, "Give a display name.")
      .max(NAME_MAX_LENGTH, `A display name is at most ${NAME_MAX_LENGTH} characters.`),
    email: emailField,
    password: newPassword,
    confirm: z.string(),
  })
  .refine(samePasswordTwice, differ);

export const forgotPasswordSchema = z.object({ email: emailField });

export const resetPasswordSchema = z
  .object({ password: newPassword, confirm: z.string() })
  .refine(samePasswordTwice, differ);

export type SignInInput = z.infer<typeof signInSchema>;
export type SignUpInput = z.infer<typeof signUpSchema>;
export type ForgotPasswordInput = z.infer<typeof forgotPasswordSchema>;
export type ResetPasswordInput = z.infer<typeof resetPasswordSchema>;
