// The database schema, in two modules: people and access, and the review-and-release domain.
export * from "./schema/auth.ts";
export * from "./schema/domain.ts";
