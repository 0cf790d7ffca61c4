// One as-built fit per thread: the request thread stays free while the optics package fits.
import { parentPort } from "node:worker_threads";
import { fitBuiltPart, fitWitnessFilm } from "@stackproof/optics";
import type { FitRequest, FitReply } from "./index.ts";

parentPort?.once("message", (req: FitRequest) => {
  let reply: FitReply;
  try {
    reply =
      req.kind === "part"
        ? { ok: true, result: fitBuiltPart(req.design, req.measurements, req.options) }
        : { ok: true, result: fitWitnessFilm(req.measurements, req.options) };
  } catch (err) {
    reply = { ok: false, range: err instanceof RangeError, message: err instanceof Error ? err.message : String(err) };
  }
  parentPort?.postMessage(reply);
});
