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

// The rules moved to policies.ts; kept here so existing imports still work.
export { canReview, isAdmin } from "./policies";
