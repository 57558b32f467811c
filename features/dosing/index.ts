export * from "./units";
export * from "./concentration";
