import { describe, expect, it } from "vitest";
import { ENGINE_VERSION } from "../src/index.ts";

describe("optics package", () => {
  it("exposes its engine version", () => {
    expect(ENGINE_VERSION).toMatch(/^\d+\.\d+\.\d+$/);
  });
});
