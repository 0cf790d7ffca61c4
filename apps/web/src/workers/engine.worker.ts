// One-off engine jobs off the main thread: refinement, as-built fit, sensitivity map.
import * as Comlink from "comlink";
import {
  fitAsBuilt,
  refineDesign,
  refineForYield,
  sensitivityMap,
  specSensitivity,
} from "@stackproof/optics";

const api = { refineDesign, refineForYield, fitAsBuilt, sensitivityMap, specSensitivity };

export type EngineWorkerApi = typeof api;

Comlink.expose(api);
