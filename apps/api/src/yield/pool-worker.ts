// Task module of the API's worker threads: the optics package's pool worker, compiled into dist/pool-worker.js.
export { default, runPoolTask } from "@stackproof/optics/pool-worker";
