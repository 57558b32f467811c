export * from "./schemas";
export * from "./settings-schema";
export * from "./admin-schemas";
