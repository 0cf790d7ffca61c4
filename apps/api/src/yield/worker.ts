// Worker thread: runs chunks of trials and merges them with the optics package. No database access here.
import { parentPort } from "node:worker_threads";
import { createYieldRunner, mergeYieldChunks, type YieldRunner } from "@stackproof/optics";
import type { WorkerReply, WorkerRequest } from "./protocol.ts";

const port = parentPort;
if (!port) throw new Error("yield worker must run in a worker thread");

// The compiled study of the run this worker saw last: consecutive chunks of a run reuse it.
let cached: { runId: string; runner: YieldRunner } | null = null;

port.on("message", (msg: WorkerRequest) => {
  let reply: WorkerReply;
  try {
    if (msg.type === "chunk") {
      if (cached?.runId !== msg.runId) cached = { runId: msg.runId, runner: createYieldRunner(msg.study) };
      reply = { taskId: msg.taskId, ok: true, chunk: cached.runner.runChunk(msg.start, msg.count) };
    } else {
      reply = { taskId: msg.taskId, ok: true, result: mergeYieldChunks(msg.study, msg.chunks) };
    }
  } catch (err) {
    reply = { taskId: msg.taskId, ok: false, error: err instanceof Error ? err.message : String(err) };
  }
  port.postMessage(reply);
});
