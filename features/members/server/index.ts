export { getAuth, authSecret } from "./auth";
export { getActor, requireActor, assertRole } from "./session";
export { getMembers, getMemberById, getRoleChangesByUserId } from "./queries";
export { changeMemberRole } from "./mutations";
export { getPageActor, requirePageRole } from "./page-session";
export { handleAuthRequest, authPath, AUTH_BODY_LIMIT } from "./auth-gateway";
export { clientAddress, PEER_ADDRESS_HEADER, CLIENT_ADDRESS_HEADER } from "./client-address";
export { SIGN_IN_LIMIT } from "./sign-in-guard";
export { settleBackgroundMail } from "./background-mail";
