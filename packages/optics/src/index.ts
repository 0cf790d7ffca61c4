// Public surface of the thin-film engine. Each module documents its units and conventions.
export { ENGINE_VERSION } from "./version.ts";
export * from "./core/index.ts";
export * from "./studies/index.ts";
