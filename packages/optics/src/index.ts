// Public surface of the thin-film engine. Each module documents its units and conventions.
export const ENGINE_VERSION = "0.1.0";
export * from "./core/index.ts";
export * from "./studies/index.ts";
