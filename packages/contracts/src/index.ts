// The Stackproof API's contracts: zod schemas of every request the API validates and every response the web app parses.
export * from "./access.ts";
export * from "./domain.ts";
export * from "./json.ts";
export * from "./limits.ts";
export * from "./lots.ts";
export * from "./uploads.ts";
