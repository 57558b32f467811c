export * from "./schemas";
export { flagLabels } from "./flag-labels";
