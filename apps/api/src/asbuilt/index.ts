// As-built fits (and the calibration of a program's error model) off the request thread: each runs in its own worker thread (at most FIT_THREADS at once,
// the rest wait), so one long fit does not stall other requests. A RangeError from the optics package comes
// back as a 400 naming the value; a fit running past FIT_TIMEOUT_MS is stopped (503).
import { Worker } from "node:worker_threads";
import type {
  BuiltFitOptions,
  BuiltFitResult,
  Calibration,
  CalibrationPart,
  Design,
  ErrorModel,
  FilmFitOptions,
  FilmFitResult,
  MeasuredSpectrum,
} from "@stackproof/optics";
import { HttpError } from "../lib/errors.ts";

/** Calibration of a program's error model from its fitted parts (designs by revision id, for optical monitoring). */
export interface CalibrationRequest {
  kind: "calibration";
  parts: CalibrationPart[];
  errorModel: ErrorModel;
  designs: Record<string, Design>;
}

export type FitRequest =
  | {
      kind: "part";
      design: Design;
      measurements: MeasuredSpectrum[];
      options: Omit<BuiltFitOptions, "onProgress" | "shouldStop">;
    }
  | { kind: "film"; measurements: MeasuredSpectrum[]; options: FilmFitOptions }
  | CalibrationRequest;

export type FitReply =
  | { ok: true; result: BuiltFitResult | FilmFitResult | Calibration }
  | { ok: false; range: boolean; message: string };

/** Fits running at once (the machine's two cores; more would only slow each other). */
export const FIT_THREADS = 2;
/** A fit is stopped after this long. */
export const FIT_TIMEOUT_MS = 120_000;

let running = 0;
const waiting: (() => void)[] = [];

async function slot(): Promise<() => void> {
  if (running >= FIT_THREADS) await new Promise<void>((resolve) => waiting.push(resolve));
  running++;
  return () => {
    running--;
    waiting.shift()?.();
  };
}

async function run(req: FitRequest): Promise<BuiltFitResult | FilmFitResult | Calibration> {
  const done = await slot();
  try {
    // From source: the tsx boot file; in the compiled server (dist/): the bundled fit-worker.js beside this chunk.
    const here = import.meta.url;
    const entry = here.endsWith(".ts") ? new URL("./fit-boot.mjs", here) : new URL("./fit-worker.js", here);
    const worker = new Worker(entry);
    const reply = await new Promise<FitReply>((resolve) => {
      const timer = setTimeout(
        () =>
          resolve({
            ok: false,
            range: false,
            message: `the fit did not finish within ${FIT_TIMEOUT_MS / 1000} s`,
          }),
        FIT_TIMEOUT_MS,
      );
      const finish = (r: FitReply) => {
        clearTimeout(timer);
        resolve(r);
      };
      worker.once("message", finish);
      worker.once("error", (err) =>
        finish({ ok: false, range: false, message: `fit thread failed: ${err.message}` }),
      );
      worker.once("exit", (code) =>
        finish({ ok: false, range: false, message: `fit thread stopped (exit code ${code})` }),
      );
      worker.postMessage(req);
    });
    await worker.terminate();
    if (reply.ok) return reply.result;
    if (reply.range) throw new HttpError(400, "invalid_input", reply.message);
    throw new HttpError(503, "fit_failed", `The fit could not be completed: ${reply.message}.`);
  } finally {
    done();
  }
}

/** {@link fitBuiltPart} in a worker thread. */
export const fitPartOffThread = (
  design: Design,
  measurements: MeasuredSpectrum[],
  options: Omit<BuiltFitOptions, "onProgress" | "shouldStop">,
) => run({ kind: "part", design, measurements, options }) as Promise<BuiltFitResult>;

/** {@link fitWitnessFilm} in a worker thread. */
export const fitFilmOffThread = (measurements: MeasuredSpectrum[], options: FilmFitOptions) =>
  run({ kind: "film", measurements, options }) as Promise<FilmFitResult>;

/** {@link calibrateErrorModel} and, when the error model has a process model, {@link calibrateProcessModel}, in a worker thread. */
export const calibrateOffThread = (req: CalibrationRequest) => run(req) as Promise<Calibration>;
