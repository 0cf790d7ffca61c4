// Entry of an as-built fit thread: register tsx's loader (Node 20 refuses a .ts worker entry), then load the worker.
import { register } from "tsx/esm/api";

register();
await import("./fit-worker.ts");
