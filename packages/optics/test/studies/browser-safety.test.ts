// The web app bundles src/index.ts for the browser: the studies half must not reach Node-only modules.
import { readdirSync, readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const dir = fileURLToPath(new URL("../../src/studies/", import.meta.url));

describe("studies are browser-safe", () => {
  it.each(readdirSync(dir).filter((f) => f.endsWith(".ts")))(
    "%s imports no node: module and reads no process state",
    (file) => {
      const text = readFileSync(dir + file, "utf8");
      expect(text).not.toMatch(/from\s+["']node:/);
      expect(text).not.toMatch(/import\(\s*["']node:/);
      expect(text).not.toMatch(/\bprocess\./);
      expect(text).not.toMatch(/from\s+["']\.\.\/cli/);
    },
  );
});
