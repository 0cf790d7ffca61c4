// The lint rule that keeps imports one-way (eslint-rules/one-way-imports.js), tried with imports that break it.
import path from "node:path";
import { describe, expect, it } from "vitest";
import { violation } from "../../../eslint-rules/one-way-imports.js";

const root = path.resolve(import.meta.dirname, "../../..");
const at = (p: string) => path.join(root, p);

describe("one-way imports", () => {
  it("refuses a feature importing another feature, however the path is spelled", () => {
    expect(violation(at("apps/web/src/features/studies/components/panel.tsx"), "../../workspace/api/get-revision.ts")).toMatch(
      /feature "studies" imports feature "workspace"/,
    );
    expect(violation(at("apps/web/src/features/studies/api/x.ts"), "../../../features/review/api/threads.ts")).toMatch(
      /features do not import each other/,
    );
  });

  it("lets a feature import its own files, shared code and packages", () => {
    const file = at("apps/web/src/features/studies/components/panel.tsx");
    expect(violation(file, "../api/yield-runs.ts")).toBeNull();
    expect(violation(file, "../../../components/ui/badge.tsx")).toBeNull();
    expect(violation(file, "@stackproof/contracts")).toBeNull();
  });

  it("refuses shared web code importing a feature; the app layer may compose features", () => {
    expect(violation(at("apps/web/src/components/layout/brand.tsx"), "../../features/auth/api/sign-out.ts")).toMatch(
      /shared web code imports feature "auth"/,
    );
    expect(violation(at("apps/web/src/lib/session.ts"), "../features/auth/api/sign-in.ts")).not.toBeNull();
    expect(violation(at("apps/web/src/app/app-shell.tsx"), "../features/auth/api/sign-out.ts")).toBeNull();
  });

  it("refuses the optics and contracts packages importing anything of apps/", () => {
    expect(violation(at("packages/optics/src/core/design.ts"), "../../../../apps/api/src/env.ts")).not.toBeNull();
    expect(violation(at("packages/contracts/src/domain.ts"), "@stackproof/api")).not.toBeNull();
    expect(violation(at("packages/contracts/src/domain.ts"), "@stackproof/optics")).toBeNull();
  });
});
