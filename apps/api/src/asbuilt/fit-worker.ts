// One as-built fit (or calibration) per thread: the request thread stays free while the optics package works.
import { parentPort } from "node:worker_threads";
import { calibrateErrorModel, calibrateProcessModel, fitBuiltPart, fitWitnessFilm } from "@stackproof/optics";
import type { FitRequest, FitReply } from "./index.ts";

parentPort?.once("message", (req: FitRequest) => {
  let reply: FitReply;
  try {
    if (req.kind === "part")
      reply = { ok: true, result: fitBuiltPart(req.design, req.measurements, req.options) };
    else if (req.kind === "film") reply = { ok: true, result: fitWitnessFilm(req.measurements, req.options) };
    else {
      const calibration = calibrateErrorModel(req.parts);
      const indexDriftPct = Object.fromEntries(
        Object.entries(calibration.indexDrift).map(([m, e]) => [m, e.sigmaPct]),
      );
      reply = {
        ok: true,
        result: {
          ...calibration,
          process: req.errorModel.process
            ? calibrateProcessModel(req.parts, req.errorModel, { designs: req.designs, indexDriftPct })
            : null,
        },
      };
    }
  } catch (err) {
    reply = {
      ok: false,
      range: err instanceof RangeError,
      message: err instanceof Error ? err.message : String(err),
    };
  }
  parentPort?.postMessage(reply);
});
