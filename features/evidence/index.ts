export * from "./summary";
export * from "./stats";
export * from "./dose-response";
