// Messages between the job service and its worker threads.
import type { YieldChunk, YieldResult, YieldStudy } from "@stackproof/optics";

export type WorkerRequest =
  | { type: "chunk"; taskId: number; runId: string; study: YieldStudy; start: number; count: number }
  | { type: "merge"; taskId: number; runId: string; study: YieldStudy; chunks: YieldChunk[] };

export type WorkerReply =
  | { taskId: number; ok: true; chunk: YieldChunk }
  | { taskId: number; ok: true; result: YieldResult }
  | { taskId: number; ok: false; error: string };
