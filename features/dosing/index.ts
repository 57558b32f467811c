export * from "./units";
export * from "./concentration";
export * from "./strength";
export * from "./stock-reading";
export * from "./guard-rails";
export * from "./syringe";
export * from "./plan";
export * from "./schemas";
