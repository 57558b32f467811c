export * from "./summary";
export * from "./stats";
