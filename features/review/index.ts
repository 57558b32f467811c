export * from "./schemas";
