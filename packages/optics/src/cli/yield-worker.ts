// Node worker thread running yield chunks for the pool in node-pool.ts.
import { parentPort, workerData } from "node:worker_threads";
import { createYieldRunner } from "../studies/index.ts";
import type { YieldStudy } from "../studies/index.ts";
import type { WorkerReply } from "./node-pool.ts";

const port = parentPort;
if (!port) throw new Error("yield-worker must run as a worker thread");
const send = (reply: WorkerReply): void => port.postMessage(reply);
try {
  const runner = createYieldRunner((workerData as { study: YieldStudy }).study);
  port.on("message", (msg: { type: "run"; start: number; count: number }) => {
    try {
      send({ type: "chunk", chunk: runner.runChunk(msg.start, msg.count) });
    } catch (error) {
      send({ type: "error", message: error instanceof Error ? error.message : String(error) });
    }
  });
  send({ type: "ready" });
} catch (error) {
  send({ type: "error", message: error instanceof Error ? error.message : String(error) });
}
