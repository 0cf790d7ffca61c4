// Production build of the API: one ESM bundle per entry in dist/. The workspace packages (@stackproof/optics is
// consumed as TypeScript source) are bundled; every npm dependency stays external and is loaded from
// node_modules (better-sqlite3 and @node-rs/argon2 are native; piscina and bullmq load files of their own).
import { defineConfig } from "tsup";

export default defineConfig({
  entry: {
    index: "src/index.ts", // the server
    "pool-worker": "src/yield/pool-worker.ts", // piscina task module (worker threads load this compiled file)
    "fit-worker": "src/asbuilt/fit-worker.ts", // as-built fit thread (asbuilt/index.ts loads this compiled file)
    worker: "src/worker.ts", // Redis (BullMQ) worker process
    backup: "src/backup.ts", // online backup and restore command
  },
  format: ["esm"],
  platform: "node",
  target: "node20",
  outDir: "dist",
  clean: true,
  splitting: true,
  sourcemap: true,
  noExternal: [/^@stackproof\//],
});
