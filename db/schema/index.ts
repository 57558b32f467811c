export * from "./auth";
export * from "./club";
export * from "./catalogue";
export * from "./reports";
export * from "./idempotency";
export * from "./jobs";
