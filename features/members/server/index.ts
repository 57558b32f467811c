import "server-only";
export { getAuth, authSecret } from "./auth";
export { getActor, requireActor, assertRole } from "./session";
export { getMembers, getMemberById, getRoleChangesByUserId } from "./queries";
export { changeMemberRole } from "./mutations";
export { getPageActor, requirePageRole } from "./page-session";
