// Process-realistic tolerance studies: how the chamber controls each layer (time, quartz crystal,
// optical monitoring, uniformity). See README.md ("Process models") and docs/studies.md.
export * from "./schema.ts";
export * from "./monitor.ts";
export * from "./sampler.ts";
export * from "./compare.ts";
