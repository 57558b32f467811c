export * from "./schemas";
export * from "./settings-schema";
