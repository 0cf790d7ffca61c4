// A yield run whose trials or result cannot be stored is failed with the reason, never left running, and the
// runs queued after it still run. The storage failure is real: a SQLite trigger refuses the write.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestServer, type TestServer } from "../support/context.ts";
import { API, createDesign, createProgram, createTeam, startRun, waitForRun, type Team } from "./fixtures.ts";

let server: TestServer;
let team: Team;
let revisionId: string;

beforeAll(async () => {
  server = await createTestServer();
  team = await createTeam(server);
  const program = await createProgram(team);
  revisionId = (await createDesign(team, program.id)).revision.id;
}, 60000);
afterAll(async () => {
  await server.close();
});

function refuse(table: "yield_chunks" | "yield_runs", when: "INSERT" | "UPDATE") {
  const name = `refuse_${table}_${when.toLowerCase()}`;
  server.ctx.db.$client.exec(
    `CREATE TRIGGER ${name} BEFORE ${when} ON ${table} ` +
      (table === "yield_runs" ? "WHEN NEW.status = 'done' " : "") +
      `BEGIN SELECT RAISE(ABORT, 'storage refused the write'); END`,
  );
  return () => server.ctx.db.$client.exec(`DROP TRIGGER ${name}`);
}

describe("yield runs when storage fails", () => {
  it("fails a run whose chunks cannot be stored, and runs the next one", async () => {
    const designer = team.members.designer.agent;
    const restore = refuse("yield_chunks", "INSERT");
    const broken = await startRun(designer, revisionId, { trials: 60 });
    let failed;
    try {
      failed = await waitForRun(designer, broken.id, 15000);
    } finally {
      restore();
    }
    expect(failed.status).toBe("failed");
    expect(failed.error).toMatch(/trials could not be stored: storage refused the write/);
    expect(failed.finishedAt).not.toBeNull();

    const next = await startRun(designer, revisionId, { trials: 60 });
    expect(await waitForRun(designer, next.id, 15000)).toMatchObject({ status: "done", verified: true });
  });

  it("fails a run whose result cannot be stored, and runs the next one", async () => {
    const designer = team.members.designer.agent;
    const restore = refuse("yield_runs", "UPDATE");
    const broken = await startRun(designer, revisionId, { trials: 60 });
    let failed;
    try {
      failed = await waitForRun(designer, broken.id, 15000);
    } finally {
      restore();
    }
    expect(failed.status).toBe("failed");
    expect(failed.error).toMatch(/the result could not be stored: storage refused the write/);
    const audit = await team.members.admin.agent
      .get(`${API}/audit?subjectType=yield_run&subjectId=${broken.id}`)
      .expect(200);
    expect(audit.body.items.map((e: { action: string }) => e.action)).toContain("yield_run.failed");

    const next = await startRun(designer, revisionId, { trials: 60 });
    expect(await waitForRun(designer, next.id, 15000)).toMatchObject({ status: "done", verified: true });
  });
});
