// One file per domain; each export line brings its tables into the Drizzle schema and drizzle-kit.
export * from "./auth";
export * from "./garage";
export * from "./sessions";
export * from "./jobs";
export * from "./api-tokens";
export * from "./audit";
export * from "./briefs";
export * from "./report";
