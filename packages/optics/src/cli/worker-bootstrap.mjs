// Starts a TypeScript worker thread under tsx (worker threads do not inherit the tsx loader of the main thread).
import { workerData } from "node:worker_threads";
import { register } from "tsx/esm/api";

register();
await import(workerData.entry);
