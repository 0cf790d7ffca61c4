// One dedicated Web Worker (workers/process.worker.ts) per job, so cancelling is terminating it.
import { useCallback, useEffect, useRef } from "react";
import * as Comlink from "comlink";
import type { ProcessWorkerApi } from "../../../workers/process.worker.ts";

export interface ProcessWorkerHandle {
  api: Comlink.Remote<ProcessWorkerApi>;
  /** Rejects with an AbortError when this job's worker is terminated (race the call against it). */
  cancelled: Promise<never>;
  /** Terminate this job's worker (no effect on a newer job). */
  dispose: () => void;
  /** True once disposed: messages the worker posted before it was terminated may still arrive; drop them. */
  disposed: () => boolean;
}

/** Start jobs on a fresh process worker; starting a job or `stop()` terminates the current one. */
export function useProcessWorker(): { start: () => ProcessWorkerHandle; stop: () => void } {
  const current = useRef<ProcessWorkerHandle | null>(null);
  const stop = useCallback(() => {
    current.current?.dispose();
  }, []);
  const start = useCallback((): ProcessWorkerHandle => {
    current.current?.dispose();
    const worker = new Worker(new URL("../../../workers/process.worker.ts", import.meta.url), { type: "module", name: "stackproof-process" });
    let reject: (e: unknown) => void = () => {};
    const cancelled = new Promise<never>((_, r) => {
      reject = r;
    });
    cancelled.catch(() => {});
    let done = false;
    const handle: ProcessWorkerHandle = {
      api: Comlink.wrap<ProcessWorkerApi>(worker),
      cancelled,
      dispose: () => {
        if (done) return;
        done = true;
        worker.terminate();
        reject(new DOMException("The job was cancelled.", "AbortError"));
        if (current.current === handle) current.current = null;
      },
      disposed: () => done,
    };
    current.current = handle;
    return handle;
  }, []);
  useEffect(() => stop, [stop]);
  return { start, stop };
}
