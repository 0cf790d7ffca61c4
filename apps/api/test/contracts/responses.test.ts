// Every main route's response against its contract schema (packages/contracts), on the demo workspace in a real
// SQLite file: the schema the web app parses with must accept the body whole (expectContract), and so must the
// schema the route declares (the OpenAPI document's source).
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Response } from "supertest";
import { z } from "zod";
import * as C from "@stackproof/contracts";
import { createApp } from "../../src/app.ts";
import { createContext, type AppContext } from "../../src/context.ts";
import { loadEnv } from "../../src/env.ts";
import { DEMO_PASSWORD, loadDemoData } from "../../src/demo/index.ts";
import { routeRegistry } from "../../src/lib/route.ts";
import { signIn, withOrigin } from "../support/auth.ts";
import type { TestServer } from "../support/context.ts";
import { expectContract } from "../support/contract.ts";
import { lastMailTo, tokenIn } from "../support/mail.ts";
import request from "supertest";
import { API, AR_MASK, ERROR_MODEL, programBody, singleLayerAr } from "../domain/fixtures.ts";

let dir: string;
let ctx: AppContext;
let server: TestServer;
type Agent = Awaited<ReturnType<typeof signIn>>;
let admin: Agent, designer: Agent, reviewer: Agent, approver: Agent;

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-contracts-"));
  const env = loadEnv({
    NODE_ENV: "test",
    DATA_DIR: dir,
    DEMO_DATA: "true",
    YIELD_WORKERS: "1",
    // The origin the support agents send (support/auth.ts TEST_ORIGIN).
    ALLOWED_ORIGINS: "http://stackproof.test",
  });
  ctx = await createContext(env);
  // As the entry point (src/index.ts) does.
  const demo = await loadDemoData(env, ctx.db);
  server = { ctx, app: createApp(ctx), dir, demo, close: async () => {} };
  admin = await signIn(server, "admin@halvorsen.example", DEMO_PASSWORD);
  designer = await signIn(server, "designer@halvorsen.example", DEMO_PASSWORD);
  reviewer = await signIn(server, "reviewer@halvorsen.example", DEMO_PASSWORD);
  approver = await signIn(server, "approver@halvorsen.example", DEMO_PASSWORD);
});
afterAll(async () => {
  await ctx.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

/** Checks `res` against the contract schema and against the schema its route declares, by "METHOD /path". */
function check<T extends z.ZodType>(res: Response, schema: T, routeKey: string): z.infer<T> {
  const body = expectContract(schema, res.body, routeKey);
  const declared = routeRegistry.get(routeKey)?.response;
  expect(declared, `${routeKey} declares a response schema`).toBeDefined();
  expectContract(declared!, res.body, `${routeKey} (declared)`);
  return body;
}

describe("responses match their contracts", () => {
  it("read routes of the demo workspace", async () => {
    check(await approver.get(`${API}/auth/me`).expect(200), C.SessionInfo, "GET /auth/me");
    expectContract(C.HealthSchema, (await approver.get("/api/health").expect(200)).body, "GET /api/health");

    const overview = check(
      await approver.get(`${API}/overview`).expect(200),
      C.OverviewResponse,
      "GET /overview",
    );
    expect(overview.items.length).toBeGreaterThan(0);
    expect(overview.items.some((r) => r.latestVerifiedYield !== null)).toBe(true);
    check(await approver.get(`${API}/queue`).expect(200), C.QueueResponse, "GET /queue");

    const programs = check(
      await approver.get(`${API}/programs`).expect(200),
      C.ProgramListResponse,
      "GET /programs",
    );
    const program = programs.items[0]!;
    check(
      await approver.get(`${API}/programs/${program.id}`).expect(200),
      C.ProgramDetailSchema,
      "GET /programs/:id",
    );
    const designs = check(
      await approver.get(`${API}/programs/${program.id}/designs`).expect(200),
      C.ProgramDesignsResponse,
      "GET /programs/:id/designs",
    );

    // every design, every revision: revision, threads, yield runs, gate, decisions, measurements
    for (const row of overview.items) {
      const design = check(
        await approver.get(`${API}/designs/${row.design.id}`).expect(200),
        C.DesignSchemaOut,
        "GET /designs/:id",
      );
      for (const rev of design.revisions) {
        check(
          await approver.get(`${API}/revisions/${rev.id}`).expect(200),
          C.RevisionSchema,
          "GET /revisions/:id",
        );
        check(
          await approver.get(`${API}/revisions/${rev.id}/threads`).expect(200),
          C.ThreadListResponse,
          "GET /revisions/:id/threads",
        );
        const runs = check(
          await approver.get(`${API}/revisions/${rev.id}/yield-runs`).expect(200),
          C.YieldRunListResponse,
          "GET /revisions/:id/yield-runs",
        );
        for (const run of runs.items) {
          check(
            await approver.get(`${API}/yield-runs/${run.id}`).expect(200),
            C.YieldRunSchema,
            "GET /yield-runs/:id",
          );
        }
        check(
          await approver.get(`${API}/revisions/${rev.id}/gate`).expect(200),
          C.GateSchema,
          "GET /revisions/:id/gate",
        );
        check(
          await approver.get(`${API}/revisions/${rev.id}/decisions`).expect(200),
          C.DecisionListResponse,
          "GET /revisions/:id/decisions",
        );
        check(
          await approver.get(`${API}/revisions/${rev.id}/measurements`).expect(200),
          C.MeasurementListResponse,
          "GET /revisions/:id/measurements",
        );
      }
      const [after, before] = design.revisions;
      if (after && before) {
        check(
          await approver.get(`${API}/revisions/${after.id}/diff`).query({ against: before.id }).expect(200),
          C.RevisionDiffSchema,
          "GET /revisions/:id/diff",
        );
      }
    }
    expect(designs.items.length).toBeGreaterThan(0);

    const releases = check(
      await approver.get(`${API}/releases`).expect(200),
      C.ReleaseListResponse,
      "GET /releases",
    );
    expect(releases.items.length).toBeGreaterThan(0);
    for (const r of releases.items) {
      const record = check(
        await approver.get(`${API}/releases/${r.id}`).expect(200),
        C.ReleaseRecordSchema,
        "GET /releases/:id",
      );
      expect(record.yieldRun).not.toBeNull();
    }

    check(await approver.get(`${API}/materials`).expect(200), C.MaterialListResponse, "GET /materials");
    check(await admin.get(`${API}/members`).expect(200), C.MemberListResponse, "GET /members");
    check(await admin.get(`${API}/invitations`).expect(200), C.InvitationListResponse, "GET /invitations");
    check(await admin.get(`${API}/audit`).expect(200), C.AuditListResponse, "GET /audit");
    const outbox = check(await admin.get(`${API}/outbox`).expect(200), C.OutboxListResponse, "GET /outbox");
    for (const m of outbox.items.slice(0, 3)) {
      check(await admin.get(`${API}/outbox/${m.id}`).expect(200), C.OutboxDetail, "GET /outbox/:id");
    }
  });

  it("write routes: a program, a design and its revisions, review, a yield run, an invitation", async () => {
    const program = check(
      await approver
        .post(`${API}/programs`)
        .send(programBody({ specMask: AR_MASK, errorModel: ERROR_MODEL }))
        .expect(201),
      C.ProgramSchema,
      "POST /programs",
    );
    check(
      await approver
        .patch(`${API}/programs/${program.id}`)
        .send({ description: "contract walk" })
        .expect(200),
      C.ProgramSchema,
      "PATCH /programs/:id",
    );
    const created = check(
      await designer
        .post(`${API}/programs/${program.id}/designs`)
        .send({ name: "Contract AR", stack: singleLayerAr() })
        .expect(201),
      C.CreateDesignResponse,
      "POST /programs/:id/designs",
    );
    const thicker = singleLayerAr();
    thicker.layers[0]!.thickness += 2;
    const rev2 = check(
      await designer
        .post(`${API}/designs/${created.design.id}/revisions`)
        .send({ baseRevisionId: created.revision.id, stack: thicker, note: "thicker" })
        .expect(201),
      C.RevisionSchema,
      "POST /designs/:id/revisions",
    );
    check(
      await designer
        .post(`${API}/imports/design`)
        .attach("file", Buffer.from("material,thickness_nm\nSiO2,95\n"), "ar.csv")
        .expect(200),
      C.ImportDesignResponse,
      "POST /imports/design",
    );

    const thread = check(
      await reviewer
        .post(`${API}/revisions/${rev2.id}/threads`)
        .send({ anchor: { kind: "layer", index: 0 }, severity: "advisory", body: "Check the layer." })
        .expect(201),
      C.ThreadSchema,
      "POST /revisions/:id/threads",
    );
    check(
      await designer.post(`${API}/threads/${thread.id}/comments`).send({ body: "Checked." }).expect(201),
      C.ThreadSchema,
      "POST /threads/:id/comments",
    );
    check(
      await reviewer.post(`${API}/threads/${thread.id}/resolve`).send({}).expect(200),
      C.ThreadSchema,
      "POST /threads/:id/resolve",
    );

    const { run } = check(
      await designer
        .post(`${API}/revisions/${rev2.id}/yield-runs`)
        .send({ trials: 40, seed: "contract" })
        .expect(202),
      C.CreateYieldRunResponse,
      "POST /revisions/:id/yield-runs",
    );
    // poll until the worker finishes (a bounded number of tries; a run of 40 trials takes well under a second)
    let done = run;
    for (let i = 0; i < 200 && !["done", "failed", "cancelled"].includes(done.status); i++) {
      await new Promise((r) => setTimeout(r, 50));
      done = check(
        await designer.get(`${API}/yield-runs/${run.id}`).expect(200),
        C.YieldRunSchema,
        "GET /yield-runs/:id",
      );
    }
    expect(done.status).toBe("done");
    expect(done.result?.trials).toBe(40);

    check(
      await designer.post(`${API}/revisions/${rev2.id}/transitions`).send({ action: "submit" }).expect(200),
      C.TransitionResponse,
      "POST /revisions/:id/transitions",
    );

    const invitation = check(
      await admin
        .post(`${API}/invitations`)
        .send({ email: "new.person@halvorsen.example", roles: ["reviewer"] })
        .expect(201),
      C.InvitationSchema,
      "POST /invitations",
    );
    expect(invitation.roles).toEqual(["reviewer"]);
    const members = check(
      await admin.get(`${API}/members`).expect(200),
      C.MemberListResponse,
      "GET /members",
    );
    const reviewerMember = members.items.find((m) => m.user.email === "reviewer@halvorsen.example")!;
    check(
      await admin
        .patch(`${API}/members/${reviewerMember.user.id}`)
        .send({ roles: ["reviewer", "designer"] })
        .expect(200),
      C.MemberUpdateResponse,
      "PATCH /members/:userId",
    );
  });

  it("the other routes: versions, evidence, deviations, reopen, cancel, uploads, invitation links, sign-in, error details", async () => {
    const program = check(
      await approver
        .post(`${API}/programs`)
        .send(programBody({ specMask: AR_MASK, errorModel: ERROR_MODEL }))
        .expect(201),
      C.ProgramSchema,
      "POST /programs",
    );
    check(
      await approver.get(`${API}/programs/${program.id}/versions`).expect(200),
      C.ProgramVersionsResponse,
      "GET /programs/:id/versions",
    );
    // A revision whose mask loosens the program's average limit from 2 % to 2.5 %: it needs a deviation.
    const loosened = { bands: AR_MASK.bands.map((b) => (b.id === "avg" ? { ...b, value: 2.5 } : b)) };
    const created = check(
      await designer
        .post(`${API}/programs/${program.id}/designs`)
        .send({ name: "Contract deviation", stack: singleLayerAr(), specMask: loosened })
        .expect(201),
      C.CreateDesignResponse,
      "POST /programs/:id/designs",
    );
    const revisionId = created.revision.id;
    check(
      await designer.get(`${API}/revisions/${revisionId}/evidence`).expect(200),
      C.EvidenceResponse,
      "GET /revisions/:id/evidence",
    );
    check(
      await designer.post(`${API}/revisions/${revisionId}/evidence-run`).send({}).expect(202),
      C.CreateYieldRunResponse,
      "POST /revisions/:id/evidence-run",
    );
    const asked = check(
      await designer
        .post(`${API}/revisions/${revisionId}/deviations`)
        .send({ reason: "The customer accepts 2.5 % average." })
        .expect(201),
      C.DeviationSchema,
      "POST /revisions/:id/deviations",
    );
    check(
      await approver
        .post(`${API}/revisions/${revisionId}/deviations/${asked.id}/decision`)
        .send({ accept: true })
        .expect(200),
      C.DeviationSchema,
      "POST /revisions/:id/deviations/:deviationId/decision",
    );
    const deviations = check(
      await approver.get(`${API}/revisions/${revisionId}/deviations`).expect(200),
      C.DeviationListResponse,
      "GET /revisions/:id/deviations",
    );
    expect(deviations.items.map((d) => d.status)).toEqual(["accepted"]);

    const thread = check(
      await reviewer
        .post(`${API}/revisions/${revisionId}/threads`)
        .send({ anchor: { kind: "design" }, severity: "advisory", body: "Looks fine." })
        .expect(201),
      C.ThreadSchema,
      "POST /revisions/:id/threads",
    );
    await reviewer.post(`${API}/threads/${thread.id}/resolve`).send({}).expect(200);
    check(
      await reviewer.post(`${API}/threads/${thread.id}/reopen`).send({}).expect(200),
      C.ThreadSchema,
      "POST /threads/:id/reopen",
    );

    // A run large enough to be still queued or running when the cancel arrives.
    const { run } = check(
      await designer
        .post(`${API}/revisions/${revisionId}/yield-runs`)
        .send({ trials: 150000, seed: "to-cancel" })
        .expect(202),
      C.CreateYieldRunResponse,
      "POST /revisions/:id/yield-runs",
    );
    const cancelled = check(
      await designer.post(`${API}/yield-runs/${run.id}/cancel`).expect(200),
      C.YieldRunSchema,
      "POST /yield-runs/:id/cancel",
    );
    expect(cancelled.status).toBe("cancelled");

    check(
      await designer
        .post(`${API}/materials`)
        .field("id", "contract-film")
        .field("name", "Contract film")
        .attach("file", Buffer.from("wavelength_nm,n,k\n400,1.46,0\n800,1.45,0\n"), "film.csv")
        .expect(201),
      C.MaterialOutSchema,
      "POST /materials",
    );
    check(
      await designer
        .post(`${API}/revisions/${revisionId}/measurements`)
        .attach("file", Buffer.from("wavelength_nm,R\n500,1.2\n550,1.1\n600,1.3\n"), "measured.csv")
        .expect(201),
      C.MeasurementOutSchema,
      "POST /revisions/:id/measurements",
    );

    // Error details the web app reads with their contracts: a refused CSV and a save from a stale base.
    const badCsv = await designer
      .post(`${API}/materials`)
      .field("id", "contract-bad")
      .field("name", "Bad film")
      .attach("file", Buffer.from("wavelength_nm,n,k\n400,abc,0\n800,1.45,0\n"), "bad.csv")
      .expect(422);
    expect(badCsv.body.error.code).toBe("invalid_csv");
    const problems = expectContract(
      C.CsvProblemsDetails,
      badCsv.body.error.details,
      "422 invalid_csv details",
    );
    expect(problems[0]).toMatchObject({ row: 2, column: "n" });
    const thicker = singleLayerAr();
    thicker.layers[0]!.thickness += 1;
    await designer
      .post(`${API}/designs/${created.design.id}/revisions`)
      .send({ baseRevisionId: revisionId, stack: thicker, note: "first save" })
      .expect(201);
    const stale = await designer
      .post(`${API}/designs/${created.design.id}/revisions`)
      .send({ baseRevisionId: revisionId, stack: thicker, note: "second save from the same base" })
      .expect(409);
    expect(stale.body.error.code).toBe("stale_base");
    const details = expectContract(C.StaleBaseDetails, stale.body.error.details, "409 stale_base details");
    expect(details.baseRevision?.id).toBe(revisionId);

    // An invitation link: looked up and accepted by a new person (who is then signed in), then a plain sign-in.
    await admin
      .post(`${API}/invitations`)
      .send({ email: "linked.person@halvorsen.example", roles: ["designer"] })
      .expect(201);
    const token = tokenIn(await lastMailTo(server, "linked.person@halvorsen.example"), "/accept-invitation");
    check(
      await request(server.app).get(`${API}/invitations/lookup/${token}`).expect(200),
      C.InvitationLookupSchema,
      "GET /invitations/lookup/:token",
    );
    const password = "amber-lattice-quarry-91";
    check(
      await withOrigin(request(server.app).post(`${API}/invitations/accept`))
        .send({ token, name: "Linnea Holt", password })
        .expect(200),
      C.SessionInfo,
      "POST /invitations/accept",
    );
    check(
      await withOrigin(request(server.app).post(`${API}/auth/sign-in`))
        .send({ email: "linked.person@halvorsen.example", password })
        .expect(200),
      C.SessionInfo,
      "POST /auth/sign-in",
    );
  });

  it("every JSON request schema a route validates with is an export of the contracts package", () => {
    const exported = new Set<unknown>(Object.values(C));
    const inline = [...routeRegistry.entries()]
      .flatMap(([key, r]) =>
        (["params", "query", "body"] as const)
          .filter((part) => r[part] && !exported.has(r[part]) && !(part === "body" && r.multipart))
          .map((part) => `${key} ${part}`),
      )
      .sort();
    expect(inline).toEqual([]);
  });

  it("every multipart form's text fields are those of a contracts export (the file field aside)", () => {
    const fieldSets = (Object.values(C) as unknown[])
      .filter((v): v is z.ZodObject => v instanceof z.ZodObject)
      .map((o) => Object.keys(o.shape).sort().join(","));
    const inline = [...routeRegistry.entries()]
      .filter(([, r]) => r.multipart && r.body instanceof z.ZodObject)
      .filter(([, r]) => {
        const keys = Object.keys((r.body as z.ZodObject).shape)
          .filter((k) => k !== "file")
          .sort()
          .join(",");
        return keys !== "" && !fieldSets.includes(keys);
      })
      .map(([key]) => key);
    expect(inline).toEqual([]);
  });

  it("every route that answers JSON declares its response with a schema exported by the contracts package", () => {
    const exported = new Set<unknown>(Object.values(C));
    const inline = [...routeRegistry.entries()]
      .filter(([, r]) => r.response && !exported.has(r.response))
      .map(([key]) => key);
    expect(inline).toEqual([]);
    // Routes without a response schema answer 202/204 with no body, or a file (HTML, PDF).
    const without = [...routeRegistry.entries()]
      .filter(([, r]) => !r.response)
      .map(([key]) => key)
      .sort();
    expect(without).toEqual([
      "DELETE /invitations/:id",
      "DELETE /members/:userId",
      "GET /releases/:id/pdf",
      "GET /releases/:id/print",
      "POST /auth/password-reset",
      "POST /auth/password-reset/confirm",
      "POST /auth/sign-out",
    ]);
  });
});
