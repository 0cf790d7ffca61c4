// Node worker thread running yield chunks for the pool in node-pool.ts. Keeps one compiled runner per active study.
import { parentPort } from "node:worker_threads";
import { createYieldRunner } from "../studies/index.ts";
import type { YieldRunner } from "../studies/index.ts";
import type { WorkerReply, WorkerRequest } from "./node-pool.ts";

const port = parentPort;
if (!port) throw new Error("yield-worker must run as a worker thread");
const runners = new Map<number, YieldRunner>();
const send = (reply: WorkerReply): void => port.postMessage(reply);

port.on("message", (msg: WorkerRequest) => {
  try {
    if (msg.type === "study") {
      runners.set(msg.id, createYieldRunner(msg.study));
      return;
    }
    if (msg.type === "release") {
      runners.delete(msg.id);
      return;
    }
    const runner = runners.get(msg.id);
    if (!runner) throw new RangeError(`no study loaded for run ${msg.id}`);
    send({ type: "chunk", id: msg.id, chunk: runner.runChunk(msg.start, msg.count) });
  } catch (error) {
    send({ type: "error", id: msg.id, message: error instanceof Error ? error.message : String(error) });
  }
});
