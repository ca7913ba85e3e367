export * from "./accounts.ts";
export * from "./audit.ts";
export * from "./library.ts";
export * from "./protocols.ts";
export * from "./studies.ts";
export * from "./quality.ts";
