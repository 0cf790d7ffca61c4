import { defineProject } from "vitest/config";

export default defineProject({
  test: { name: "optics", include: ["test/**/*.test.ts"], environment: "node" },
});
