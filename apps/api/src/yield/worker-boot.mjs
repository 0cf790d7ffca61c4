// Entry of a yield worker thread. On Node 20 a worker created with execArgv ["--import", "tsx"] still refuses a
// .ts entry ("Unknown file extension"), so the worker registers tsx's loader itself and then loads the TypeScript worker.
import { register } from "tsx/esm/api";

register();
await import("./worker.ts");
