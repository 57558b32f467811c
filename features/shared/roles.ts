export const roles = ["member", "moderator", "admin"] as const;
export type Role = (typeof roles)[number];

export interface Actor {
  id: string;
  name: string;
  email: string;
  role: Role;
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (roles as readonly string[]).includes(value);
}

export const canReview = (actor: Actor | null) => actor?.role === "moderator" || actor?.role === "admin";
export const isAdmin = (actor: Actor | null) => actor?.role === "admin";
