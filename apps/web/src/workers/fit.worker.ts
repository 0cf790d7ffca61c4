// As-built fits off the main thread, with progress reported back through a Comlink proxy.
// Cancelling terminates the worker (the fit is one synchronous call).
import * as Comlink from "comlink";
import { fitBuiltPart } from "@stackproof/optics";
import type { BuiltFitOptions, BuiltFitResult, Design, MeasuredSpectrum } from "@stackproof/optics";

const api = {
  fit(
    design: Design,
    measurements: MeasuredSpectrum[],
    options: Omit<BuiltFitOptions, "onProgress" | "shouldStop">,
    onProgress?: (fraction: number, stage: string) => void,
  ): BuiltFitResult {
    return fitBuiltPart(design, measurements, onProgress ? { ...options, onProgress: (f, s) => void onProgress(f, s) } : options);
  },
};

export type FitWorkerApi = typeof api;

Comlink.expose(api);
