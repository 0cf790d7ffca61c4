// As-built analysis: fits of measured parts, lot verdicts, calibration of the process model, witness films.
export * from "./measurement.ts";
export * from "./fit.ts";
export * from "./verdict.ts";
export * from "./calibrate.ts";
export * from "./calibrate-process.ts";
export * from "./film.ts";
