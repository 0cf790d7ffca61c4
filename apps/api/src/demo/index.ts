// Demo data: the fictional Halvorsen Thinfilm Works, loaded into a new database when DEMO_DATA is on.
// Evidence runs are computed here synchronously with the same optics functions the workers use, with the seed the
// server assigns (evidencePlan) and the program's minimum evidence trials, so the demo's gate reads like a real one.
import { eq } from "drizzle-orm";
import { ENGINE_VERSION, type YieldResult, type YieldStudy } from "@stackproof/optics";
import { hashPassword } from "../auth/password.ts";
import type { Db } from "../db/client.ts";
import type { Env } from "../env.ts";
import {
  comments,
  decisions,
  designs,
  memberships,
  programVersions,
  programs,
  releases,
  revisions,
  threads,
  users,
  workspaces,
  yieldRuns,
  type DecisionAction,
  type RevisionStatus,
  type Role,
  type ThreadAnchor,
} from "../db/schema.ts";
import { recordAudit } from "../lib/audit.ts";
import { newId, revisionHash } from "../domain/canonical.ts";
import type { RevisionContext } from "../domain/load.ts";
import { finishedRunValues } from "../yield/index.ts";
import { releaseSnapshot } from "../domain/workflow.ts";
import { evidenceSeed } from "../domain/evidence.ts";
import { demoPrograms, type DemoProgram, type DemoSpeaker } from "./designs.ts";
import { computeDemoEvidence, defaultEvidenceCacheDir } from "./evidence-cache.ts";

/** Demo only: every demo account uses this password. */
// Strong enough for the password rules (zxcvbn score ≥ 3), yet published: demo only, never in production unless asked.
export const DEMO_PASSWORD = "demo-quartz-lantern";
export const DEMO_WORKSPACE = "Halvorsen Thinfilm Works";

export const DEMO_ACCOUNTS: { key: string; name: string; email: string; roles: Role[]; title: string }[] = [
  {
    key: "admin",
    name: "Maren Kolstad",
    email: "admin@halvorsen.example",
    roles: ["admin"],
    title: "administrator",
  },
  {
    key: "designer",
    name: "Ilse Varga",
    email: "designer@halvorsen.example",
    roles: ["designer"],
    title: "filter designer",
  },
  {
    key: "reviewer",
    name: "Tobiah Renwick",
    email: "reviewer@halvorsen.example",
    roles: ["reviewer"],
    title: "peer reviewer",
  },
  {
    key: "approver",
    name: "Sunniva Achterberg",
    email: "approver@halvorsen.example",
    roles: ["approver"],
    title: "program manager (approver)",
  },
];

/** True when the database has no workspace yet (a new database). */
export function isNewDatabase(db: Db): boolean {
  return db.select({ id: workspaces.id }).from(workspaces).limit(1).all().length === 0;
}

const DAY = 24 * 3600 * 1000;

export interface DemoSummary {
  workspaceId: string;
  programs: number;
  revisions: number;
  yieldRuns: number;
  releases: number;
  /** Evidence runs taken from the evidence cache (see evidence-cache.ts) rather than computed. */
  cachedRuns: number;
  ms: number;
}

/**
 * Load the demo workspace into a new database.
 * @param options.evidenceCacheDir where computed demo evidence runs are kept between seedings (null: no cache)
 */
export async function seedDemo(
  db: Db,
  options: { evidenceCacheDir?: string | null } = {},
): Promise<DemoSummary> {
  const cacheDir =
    options.evidenceCacheDir === undefined ? defaultEvidenceCacheDir() : options.evidenceCacheDir;
  const t0 = performance.now();
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const now = Date.now();
  const at = (daysAgo: number, hours = 0) => new Date(now - daysAgo * DAY + hours * 3600 * 1000);
  const workspaceId = newId();
  const people = Object.fromEntries(DEMO_ACCOUNTS.map((a) => [a.key, { ...a, id: newId() }])) as Record<
    string,
    (typeof DEMO_ACCOUNTS)[number] & { id: string }
  >;
  const p = (key: string) => {
    const found = people[key];
    if (!found) throw new Error(`demo person ${key}`);
    return found;
  };
  const designer = p("designer");
  const reviewer = p("reviewer");
  const approver = p("approver");
  const specs = new Map(demoPrograms().map((d) => [d.key, d]));
  const spec = (key: string): DemoProgram => {
    const s = specs.get(key);
    if (!s) throw new Error(`demo program ${key}`);
    return s;
  };

  // Studies are computed before the transaction: better-sqlite3 transactions must stay synchronous and short.
  const study = (d: DemoProgram, revisionIndex: number): YieldStudy => {
    const rev = d.revisions[revisionIndex];
    if (!rev) throw new Error(`demo revision ${d.key}/${revisionIndex}`);
    return {
      design: rev.stack,
      mask: { ...d.mask, protective: d.protective },
      errorModel: d.errorModel,
      trials: d.trials,
      seed: evidenceSeed(revisionHash(rev.stack, d.mask), d.errorModel),
    };
  };
  let cachedRuns = 0;
  const compute = (s: YieldStudy): YieldResult => {
    const e = computeDemoEvidence(s, cacheDir);
    if (e.cached) cachedRuns++;
    return e.result;
  };
  const studies = {
    kestrel: study(spec("kestrel"), 1),
    aster: study(spec("aster"), 1),
    wren: study(spec("wren"), 1),
  };
  const results = {
    kestrel: compute(studies.kestrel),
    aster: compute(studies.aster),
    wren: compute(studies.wren),
  };

  let revisionCount = 0;
  let runCount = 0;
  let releaseCount = 0;
  db.transaction((tx) => {
    tx.insert(workspaces)
      .values({ id: workspaceId, name: DEMO_WORKSPACE, createdAt: at(30) })
      .run();
    for (const person of Object.values(people)) {
      tx.insert(users)
        .values({ id: person.id, email: person.email, name: person.name, passwordHash, createdAt: at(30) })
        .run();
      tx.insert(memberships)
        .values({ workspaceId, userId: person.id, roles: person.roles, createdAt: at(30) })
        .run();
    }

    const contexts = new Map<string, RevisionContext[]>();
    let day = 21;
    for (const d of specs.values()) {
      const programId = newId();
      const program = {
        id: programId,
        workspaceId,
        name: d.name,
        customer: d.customer,
        description: d.description,
        application: d.application,
        protective: d.protective,
        targetYield: d.targetYield,
        specMask: d.mask,
        errorModel: d.errorModel,
        studyDefaults: { trials: 2000, seed: d.key },
        minEvidenceTrials: d.trials,
        confidence: 0.95,
        version: 1,
        createdBy: approver.id,
        createdAt: at(day),
      };
      tx.insert(programs).values(program).run();
      tx.insert(programVersions)
        .values({
          id: newId(),
          programId,
          version: 1,
          targetYield: d.targetYield,
          minEvidenceTrials: d.trials,
          confidence: 0.95,
          specMask: d.mask,
          errorModel: d.errorModel,
          changes: {},
          changedBy: null,
          note: "program created",
          createdAt: at(day),
        })
        .run();
      const design = {
        id: newId(),
        programId,
        name: d.designName,
        createdBy: designer.id,
        createdAt: at(day - 1),
      };
      tx.insert(designs).values(design).run();
      const list: RevisionContext[] = [];
      d.revisions.forEach((r, i) => {
        const row = {
          id: newId(),
          designId: design.id,
          number: i + 1,
          stack: r.stack,
          specMask: d.mask,
          note: r.note,
          authorId: designer.id,
          hash: revisionHash(r.stack, d.mask),
          status: "draft" as RevisionStatus,
          statusChangedAt: null,
          createdAt: at(day - 1 - 5 * i),
        };
        tx.insert(revisions).values(row).run();
        revisionCount++;
        list.push({ revision: row, design, program });
      });
      contexts.set(d.key, list);
      day -= 4;
    }

    const rev = (key: string, n: number): RevisionContext => {
      const r = contexts.get(key)?.[n - 1];
      if (!r) throw new Error(`demo revision ${key} ${n}`);
      return r;
    };

    const decide = (
      rc: RevisionContext,
      action: DecisionAction,
      to: RevisionStatus,
      by: { id: string; name: string },
      when: Date,
      note = "",
      yieldRunId: string | null = null,
    ) => {
      const from = rc.revision.status;
      tx.insert(decisions)
        .values({
          id: newId(),
          revisionId: rc.revision.id,
          action,
          fromStatus: from,
          toStatus: to,
          actorId: by.id,
          actorName: by.name,
          revisionHash: rc.revision.hash,
          yieldRunId,
          programVersion: 1,
          note,
          at: when,
        })
        .run();
      tx.update(revisions).set({ status: to, statusChangedAt: when }).where(eqId(rc.revision.id)).run();
      rc.revision = { ...rc.revision, status: to, statusChangedAt: when };
      recordAudit(tx, {
        workspaceId,
        actorId: by.id,
        action: `revision.${{ submit: "submitted", request_changes: "changes_requested", approve: "approved", release: "released", withdraw: "withdrawn", return_to_review: "returned_to_review" }[action]}`,
        subjectType: "revision",
        subjectId: rc.revision.id,
        summary: `${by.name} ${{ submit: "submitted", request_changes: "requested changes on", approve: "approved", release: "released", withdraw: "withdrew", return_to_review: "returned to review" }[action]} ${rc.design.name} rev ${rc.revision.number}${note ? `: ${note}` : ""}`,
        data: { from, to, demo: true },
      });
    };

    const thread = (
      rc: RevisionContext,
      anchor: ThreadAnchor,
      severity: "blocking" | "advisory",
      by: { id: string },
      when: Date,
      talk: { by: { id: string }; body: string; mentions?: string[] }[],
      resolved?: { by: { id: string }; when: Date },
    ) => {
      const id = newId();
      tx.insert(threads)
        .values({
          id,
          designId: rc.design.id,
          revisionId: rc.revision.id,
          revisionNumber: rc.revision.number,
          anchor,
          severity,
          status: resolved ? "resolved" : "open",
          authorId: by.id,
          resolvedBy: resolved?.by.id ?? null,
          resolvedAt: resolved?.when ?? null,
          createdAt: when,
        })
        .run();
      talk.forEach((c, i) => {
        tx.insert(comments)
          .values({
            id: newId(),
            threadId: id,
            authorId: c.by.id,
            body: c.body,
            mentions: c.mentions ?? [],
            createdAt: new Date(when.getTime() + i * 3600 * 1000),
          })
          .run();
      });
      return id;
    };

    // The review threads of a revision come from its data in designs.ts (the demo-specs test reads the same data):
    // opened at `when`, one after the other; those marked resolved are resolved at `resolvedAt`.
    const speakers: Record<DemoSpeaker, { id: string; name: string }> = { designer, reviewer, approver };
    const threadsOf = (key: string, n: number, when: Date, resolvedAt?: Date) => {
      const list = spec(key).revisions[n - 1]?.threads ?? [];
      list.forEach((t, i) => {
        const first = t.comments[0];
        if (!first) throw new Error(`demo thread ${key} ${n}/${i} has no comment`);
        if (t.resolvedBy && !resolvedAt)
          throw new Error(`demo thread ${key} ${n}/${i} needs a resolution time`);
        thread(
          rev(key, n),
          t.anchor,
          t.severity,
          speakers[first.by],
          new Date(when.getTime() + i * 3 * 3600 * 1000),
          t.comments.map((c) => ({
            by: speakers[c.by],
            body: c.body,
            mentions: (c.mentions ?? []).map((m) => speakers[m].id),
          })),
          t.resolvedBy && resolvedAt ? { by: speakers[t.resolvedBy], when: resolvedAt } : undefined,
        );
      });
    };

    const storeRun = (
      rc: RevisionContext,
      s: YieldStudy,
      result: ReturnType<typeof compute>,
      by: { id: string },
      when: Date,
    ) => {
      const id = newId();
      const base = {
        id,
        revisionId: rc.revision.id,
        requestedBy: by.id,
        status: "running" as const,
        progressDone: 0,
        trials: s.trials,
        seed: s.seed,
        errorModel: s.errorModel,
        clientResult: null,
        result: null,
        verified: null,
        mismatch: null,
        engineVersion: ENGINE_VERSION,
        kind: "evidence" as const,
        programVersion: 1,
        error: null,
        createdAt: when,
        startedAt: when,
        finishedAt: null,
      };
      // A server-only run: verified, since the server computed it itself.
      const done = finishedRunValues(base, result);
      tx.insert(yieldRuns)
        .values({ ...base, ...done, finishedAt: new Date(when.getTime() + 60_000) })
        .run();
      runCount++;
      return id;
    };

    // Kestrel: rev 1 (cavities only) sent back with a blocking thread on the open blocking bands, resolved by
    // rev 2; rev 2 (blockers added) in review, evidence run under 905 nm turning-point monitoring above target,
    // one advisory thread: the approver can approve it.
    const k1 = rev("kestrel", 1);
    decide(k1, "submit", "in_review", designer, at(19), "Ready for a first look.");
    threadsOf("kestrel", 1, at(18), at(13));
    decide(k1, "request_changes", "changes_requested", reviewer, at(18, 4), "Blocking bands fail nominally.");
    const k2 = rev("kestrel", 2);
    storeRun(k2, studies.kestrel, results.kestrel, designer, at(14));
    decide(k2, "submit", "in_review", designer, at(14, 2), "Blockers added; evidence run attached.");
    threadsOf("kestrel", 2, at(13));

    // Aster: rev 2 in review with an evidence run below target (crystal control) and an advisory thread on the edge.
    const a2 = rev("aster", 2);
    storeRun(a2, studies.aster, results.aster, designer, at(10));
    decide(
      a2,
      "submit",
      "in_review",
      designer,
      at(10, 2),
      "Twelve periods; the 505 nm edge window is tight on the crystal.",
    );
    threadsOf("aster", 2, at(7));

    // Wren: the single-layer baseline was withdrawn; rev 2 is released with its decisions and release record.
    const w0 = rev("wren", 1);
    threadsOf("wren", 1, at(8, -3), at(8));
    decide(
      w0,
      "withdraw",
      "withdrawn",
      designer,
      at(8),
      "Baseline only; the single layer cannot reach 0.5 % average.",
    );
    const w1 = rev("wren", 2);
    const wrenRun = storeRun(w1, studies.wren, results.wren, designer, at(7, 1));
    decide(w1, "submit", "in_review", designer, at(7, 2), "Standard QHQ recipe for the window.");
    threadsOf("wren", 2, at(7, 6), at(6, 2));
    decide(w1, "approve", "approved", approver, at(6), "Yield well above target.", wrenRun);
    decide(w1, "release", "released", approver, at(5), "Released for the spring lot.", wrenRun);
    const releaseId = newId();
    const approverAuth = {
      user: { id: approver.id, email: approver.email, name: approver.name },
      sessionId: "demo",
      workspaceId,
      workspaceName: DEMO_WORKSPACE,
      roles: approver.roles,
    };
    tx.insert(releases)
      .values({
        id: releaseId,
        workspaceId,
        revisionId: w1.revision.id,
        designId: w1.design.id,
        programId: w1.program.id,
        yieldRunId: wrenRun,
        releasedBy: approver.id,
        releasedAt: at(5),
        snapshot: releaseSnapshot(tx, w1, wrenRun, releaseId, approverAuth, at(5)),
      })
      .run();
    releaseCount++;

    // Merlin (protective): rev 1 sent back with a blocking thread still open; rev 2 is a draft it carries forward to.
    const m1 = rev("merlin", 1);
    decide(m1, "submit", "in_review", designer, at(7), "First notch candidate.");
    threadsOf("merlin", 1, at(6));
    decide(
      m1,
      "request_changes",
      "changes_requested",
      reviewer,
      at(6, 2),
      "OD margin too thin for a protective part.",
    );
  });
  return {
    workspaceId,
    programs: specs.size,
    revisions: revisionCount,
    yieldRuns: runCount,
    releases: releaseCount,
    cachedRuns,
    ms: Math.round(performance.now() - t0),
  };
}

const eqId = (id: string) => eq(revisions.id, id);

/** Whether the demo accounts exist in this database (they are printed at start-up only then). */
export function isDemoWorkspacePresent(db: Db): boolean {
  return (
    db
      .select({ id: users.id })
      .from(users)
      .where(eq(users.email, DEMO_ACCOUNTS[0]?.email ?? ""))
      .limit(1)
      .all().length > 0
  );
}

/**
 * The demo workspace, loaded when DEMO_DATA asks for it and the database is new (no workspace yet); null otherwise.
 * Called by the entry point (src/index.ts) after the context is built.
 */
export async function loadDemoData(env: Pick<Env, "DEMO_DATA">, db: Db): Promise<DemoSummary | null> {
  return env.DEMO_DATA && isNewDatabase(db) ? seedDemo(db) : null;
}
