// The lint rules that keep the API layered, run through the repository's own ESLint configuration (what `pnpm lint`
// runs): routes do not write the database (eslint-rules/routes-call-domain.js) and the API's imports go one way
// (eslint-rules/one-way-imports.js). Each refused snippet is a way a route could write around the domain layer.
import path from "node:path";
import { ESLint } from "eslint";
import { describe, expect, it } from "vitest";
import { violation } from "../../../../eslint-rules/one-way-imports.js";

const root = path.resolve(import.meta.dirname, "../../../..");
const at = (p: string) => path.join(root, p);
const eslint = new ESLint({ cwd: root });

/** The messages of house/routes-call-domain for `code` linted as if it were the file `file`. */
async function writesIn(code: string, file = "apps/api/src/routes/domain/sneaky.ts"): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath: at(file) });
  return (result?.messages ?? [])
    .filter((m) => m.ruleId === "house/routes-call-domain")
    .map((m) => m.message);
}

describe("routes do not write the database (house/routes-call-domain)", () => {
  it("refuses drizzle writes in a route, whatever they are called on", async () => {
    for (const code of [
      "ctx.db.insert(users).values({ id: 'x' }).run();",
      "tx.update(threads).set({ status: 'open' }).where(x).run();",
      "db.delete(sessions).where(x).run();",
      "ctx.db.run(sql`delete from sessions`);",
      "ctx.db.$client.exec('delete from sessions');",
      "ctx.db.$client.prepare('update users set name = ?').run('x');",
    ]) {
      expect(await writesIn(code), code).not.toEqual([]);
    }
  });

  it("refuses a transaction, an audit entry and lucia's session writes in a route", async () => {
    expect(await writesIn("ctx.db.transaction((tx) => 1);")).toEqual([
      expect.stringMatching(/^\.transaction in a route/),
    ]);
    expect(await writesIn("recordAudit(ctx.db, entry);")).toEqual([
      expect.stringMatching(/^recordAudit\(\) in a route/),
    ]);
    expect(await writesIn("await lucia.invalidateSession(id);")).not.toEqual([]);
    expect(await writesIn("await lucia.createSession(userId, {});")).not.toEqual([]);
  });

  it("refuses the ways around it: a computed name, a bound method, destructuring", async () => {
    expect(await writesIn('ctx.db["insert"](users).values(v).run();')).not.toEqual([]);
    expect(await writesIn("const write = ctx.db.insert.bind(ctx.db); write(users);")).not.toEqual([]);
    expect(await writesIn("ctx.db.update.call(ctx.db, users);")).not.toEqual([]);
    expect(await writesIn("const { insert } = ctx.db; insert(users);")).not.toEqual([]);
  });

  it("lets a route read, call domain functions and use a result field named run", async () => {
    expect(await writesIn("const row = ctx.db.select().from(users).where(x).get();")).toEqual([]);
    expect(
      await writesIn("const out = requestEvidenceRun(ctx.db, input); ctx.jobs.enqueue(out.run.id);"),
    ).toEqual([]);
    expect(await writesIn("const { run, created } = requestEvidenceRun(ctx.db, input);")).toEqual([]);
  });

  it("applies to routes and the demo seeder; the domain layer writes", async () => {
    expect(await writesIn("db.insert(users).values(v).run();", "apps/api/src/domain/accounts.ts")).toEqual(
      [],
    );
    // The seeder builds its data through domain functions inside the one transaction it may open.
    expect(await writesIn("tx.insert(programs).values(p).run();", "apps/api/src/demo/index.ts")).not.toEqual(
      [],
    );
    expect(await writesIn("recordAudit(tx, entry);", "apps/api/src/demo/index.ts")).not.toEqual([]);
    expect(
      await writesIn("db.transaction((tx) => storeProgram(tx, input));", "apps/api/src/demo/index.ts"),
    ).toEqual([]);
  });

  it("does not count feeding a hash as a write", async () => {
    expect(await writesIn('createHash("sha256").update(text).digest("hex");')).toEqual([]);
  });

  it("passes on every route file and the demo seeder as they stand", async () => {
    const results = await eslint.lintFiles([at("apps/api/src/routes"), at("apps/api/src/demo")]);
    const found = results.flatMap((r) =>
      r.messages
        .filter((m) => m.ruleId === "house/routes-call-domain")
        .map((m) => `${r.filePath}:${m.line} ${m.message}`),
    );
    expect(found).toEqual([]);
  });
});

describe("API imports go one way (house/one-way-imports)", () => {
  it("refuses the domain layer importing routes, the app, the context, the entry point or the demo", () => {
    const file = at("apps/api/src/domain/workflow.ts");
    for (const spec of [
      "../routes/domain/yield.ts",
      "../app.ts",
      "../context.ts",
      "../index.ts",
      "../demo/index.ts",
    ]) {
      expect(violation(file, spec), spec).toMatch(/the domain layer imports no routes/);
    }
  });

  it("refuses anything but app.ts importing routes/", () => {
    expect(violation(at("apps/api/src/lib/route.ts"), "../routes/access/auth.ts")).toMatch(
      /only src\/app.ts imports routes/,
    );
    expect(violation(at("apps/api/src/domain/threads.ts"), "../routes/domain/threads.ts")).not.toBeNull();
    expect(violation(at("apps/api/src/app.ts"), "./routes/domain/index.ts")).toBeNull();
    expect(violation(at("apps/api/src/routes/domain/index.ts"), "./threads.ts")).toBeNull();
  });

  it("lets only the entry point load the demo seeder (no import circle through the demo)", () => {
    expect(violation(at("apps/api/src/context.ts"), "./demo/index.ts")).toMatch(/only the entry point/);
    expect(violation(at("apps/api/src/routes/access/auth.ts"), "../../demo/index.ts")).toMatch(
      /only the entry point/,
    );
    expect(violation(at("apps/api/src/yield/index.ts"), "../demo/designs.ts")).not.toBeNull();
    expect(violation(at("apps/api/src/index.ts"), "./demo/index.ts")).toBeNull();
    expect(violation(at("apps/api/src/demo/index.ts"), "./designs.ts")).toBeNull();
    expect(violation(at("apps/api/src/demo/index.ts"), "../domain/workflow.ts")).toBeNull();
  });

  it("lets routes import the domain and the domain import lib, db and mail", () => {
    expect(violation(at("apps/api/src/routes/domain/threads.ts"), "../../domain/threads.ts")).toBeNull();
    expect(violation(at("apps/api/src/domain/accounts.ts"), "../lib/audit.ts")).toBeNull();
    expect(violation(at("apps/api/src/domain/accounts.ts"), "../mail/index.ts")).toBeNull();
  });
});
