// Studies built on the core engine: spec masks, sensitivity, Monte Carlo yield, refinement and as-built fits.
// Browser-safe: nothing here imports node: modules (the Node worker pool lives in src/cli/).
export * from "./spec.ts";
export * from "./band-view.ts";
export * from "./wilson.ts";
export * from "./random.ts";
export * from "./error-model.ts";
export * from "./montecarlo.ts";
export * from "./least-squares.ts";
export * from "./refine.ts";
export * from "./fit.ts";
export * from "./sensitivity.ts";
export * from "./process/index.ts";
export { parseWith, describeValue } from "./validate.ts";
