import "server-only";
import { createAccessControl } from "better-auth/plugins/access";
import { defaultStatements } from "better-auth/plugins/admin/access";

// Tanklore's three roles for better-auth's admin plugin. Only admins may manage users;
// moderators' powers (review) are Tanklore's own and checked in features/review.
export const ac = createAccessControl({ ...defaultStatements });

export const member = ac.newRole({ user: [], session: [] });
export const moderator = ac.newRole({ user: [], session: [] });
export const admin = ac.newRole({
  user: ["create", "list", "set-role", "ban", "delete", "set-password", "get", "update"],
  session: ["list", "revoke", "delete"],
});
