export * from "./accounts.ts";
export * from "./audit.ts";
