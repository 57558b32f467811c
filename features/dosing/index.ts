export * from "./units";
export * from "./concentration";
export * from "./strength";
export * from "./syringe";
export * from "./plan";
export * from "./schemas";
