import { defineProject } from "vitest/config";

export default defineProject({
  test: {
    name: "integration",
    include: ["api/**/*.test.ts", "browser/**/*.test.ts"],
    environment: "node",
    globalSetup: ["./browser/support/global-setup.ts"],
    testTimeout: 90_000,
    hookTimeout: 120_000,
    // Browser suites each start a server and a Chromium: on a 2-core machine run the files one after another.
    fileParallelism: false,
  },
});
