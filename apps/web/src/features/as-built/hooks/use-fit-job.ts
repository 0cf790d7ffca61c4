// Runs an as-built fit in its own Web Worker with progress and cancel (cancel terminates the worker).
import { useCallback, useEffect, useRef, useState } from "react";
import * as Comlink from "comlink";
import type { BuiltFitOptions, BuiltFitResult, Design, MeasuredSpectrum } from "@stackproof/optics";
import type { FitWorkerApi } from "../../../workers/fit.worker.ts";

export type FitJobState =
  | { s: "idle" }
  | { s: "running"; fraction: number; stage: string }
  | { s: "done"; result: BuiltFitResult; key: string }
  | { s: "cancelled" }
  | { s: "error"; message: string };

export function useFitJob() {
  const [state, setState] = useState<FitJobState>({ s: "idle" });
  const worker = useRef<Worker | null>(null);
  const stop = useCallback(() => {
    worker.current?.terminate();
    worker.current = null;
  }, []);
  useEffect(() => stop, [stop]);

  const run = useCallback(
    async (key: string, design: Design, measurements: MeasuredSpectrum[], options: Omit<BuiltFitOptions, "onProgress" | "shouldStop">): Promise<BuiltFitResult | null> => {
      stop();
      const w = new Worker(new URL("../../../workers/fit.worker.ts", import.meta.url), { type: "module", name: "stackproof-fit" });
      worker.current = w;
      setState({ s: "running", fraction: 0, stage: "starting" });
      const api = Comlink.wrap<FitWorkerApi>(w);
      try {
        const result = await api.fit(
          design,
          measurements,
          options,
          Comlink.proxy((fraction: number, stage: string) => {
            if (worker.current === w) setState({ s: "running", fraction, stage });
          }),
        );
        if (worker.current !== w) return null;
        setState({ s: "done", result, key });
        return result;
      } catch (e) {
        if (worker.current === w) setState({ s: "error", message: e instanceof Error ? e.message : String(e) });
        return null;
      } finally {
        if (worker.current === w) stop();
      }
    },
    [stop],
  );

  const cancel = useCallback(() => {
    stop();
    setState({ s: "cancelled" });
  }, [stop]);

  return { state, run, cancel };
}
