// Process comparison off the main thread: yield of one design under several process models, per-layer
// error statistics, and the monitoring traces of one sample build. Cancel by terminating the worker.
import * as Comlink from "comlink";
import { compareProcesses, monitoringTraces } from "@stackproof/optics";
import type { Design, ErrorModel, ProcessComparisonEntry, ProcessModelInput, YieldStudy } from "@stackproof/optics";

const api = {
  async compare(
    study: YieldStudy,
    processes: (ProcessModelInput | null)[],
    onProgress: (done: number, total: number) => void,
  ): Promise<ProcessComparisonEntry[]> {
    let last = 0;
    return compareProcesses(study, processes, {
      chunkSize: 250,
      onProgress: (done, total) => {
        const now = Date.now();
        if (now - last > 100 || done === total) {
          last = now;
          onProgress(done, total);
        }
      },
    });
  },
  traces(design: Design, errorModel: ErrorModel, seed: string, trial: number) {
    return monitoringTraces(design, errorModel, seed, trial, 160);
  },
};

export type ProcessWorkerApi = typeof api;

Comlink.expose(api);
