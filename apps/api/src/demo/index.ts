// Demo data: the fictional Halvorsen Thinfilm Works, loaded into a new database when DEMO_DATA is on.
// Evidence runs are computed here synchronously with the same optics functions the workers use, with the seed the
// server assigns (evidencePlan) and the program's minimum evidence trials, so the demo's gate reads like a real one.
// Every row is written through the domain functions (src/domain: storeProgram, storeRevision, recordDecision, ...),
// back-dated with their `at`; the entry point (src/index.ts) calls loadDemoData, nothing else imports this module.
import { eq } from "drizzle-orm";
import type { YieldResult, YieldStudy } from "@stackproof/optics";
import { hashPassword } from "../auth/password.ts";
import type { Db } from "../db/client.ts";
import type { Env } from "../env.ts";
import {
  users,
  workspaces,
  type DecisionAction,
  type RevisionStatus,
  type Role,
  type ThreadAnchor,
} from "../db/schema.ts";
import { revisionHash } from "../domain/canonical.ts";
import { createAccount } from "../domain/accounts.ts";
import { addMember } from "../domain/members.ts";
import { storeProgram } from "../domain/programs.ts";
import { storeDesign, storeRevision } from "../domain/revisions.ts";
import { storeComment, storeThread } from "../domain/threads.ts";
import { recordEvidenceResult } from "../domain/yield-runs.ts";
import { createWorkspace, DEMO_ADMIN_EMAIL } from "../domain/workspaces.ts";
import type { RevisionContext } from "../domain/load.ts";
import { recordDecision, storeRelease } from "../domain/workflow.ts";
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
    email: DEMO_ADMIN_EMAIL,
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
  let workspaceId = "";
  const people = Object.fromEntries(DEMO_ACCOUNTS.map((a) => [a.key, { ...a, id: "" }])) as Record<
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
  // The administrator (quality lead) sets the programs' rules, so the program manager may sign off against them.
  const admin = p("admin");
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
    workspaceId = createWorkspace(tx, { name: DEMO_WORKSPACE, at: at(30) });
    for (const person of Object.values(people)) {
      person.id = createAccount(tx, { email: person.email, name: person.name, passwordHash, at: at(30) });
      addMember(tx, { workspaceId, userId: person.id, roles: person.roles, at: at(30) });
    }

    const contexts = new Map<string, RevisionContext[]>();
    let day = 21;
    for (const d of specs.values()) {
      const program = storeProgram(tx, {
        workspaceId,
        createdBy: admin.id,
        at: at(day),
        program: {
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
        },
      });
      const design = storeDesign(tx, {
        programId: program.id,
        name: d.designName,
        createdBy: designer.id,
        at: at(day - 1),
      });
      const list: RevisionContext[] = [];
      d.revisions.forEach((r, i) => {
        const revision = storeRevision(tx, {
          design,
          stack: r.stack,
          specMask: d.mask,
          note: r.note,
          authorId: designer.id,
          at: at(day - 1 - 5 * i),
        });
        revisionCount++;
        list.push({ revision, design, program });
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
      rc.revision = recordDecision(tx, {
        workspaceId,
        rc,
        action,
        to,
        actor: by,
        at: when,
        note,
        yieldRunId,
        programVersion: 1,
      }).revision;
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
      const id = storeThread(tx, {
        rc,
        anchor,
        severity,
        authorId: by.id,
        at: when,
        ...(resolved ? { resolved: { by: resolved.by.id, at: resolved.when } } : {}),
      });
      talk.forEach((c, i) => {
        storeComment(tx, {
          threadId: id,
          authorId: c.by.id,
          body: c.body,
          mentions: c.mentions ?? [],
          at: new Date(when.getTime() + i * 3600 * 1000),
        });
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
      // A server-only run: verified, since the server computed it itself.
      const id = recordEvidenceResult(tx, {
        rc,
        study: s,
        result,
        requestedBy: by.id,
        at: when,
        finishedAt: new Date(when.getTime() + 60_000),
        programVersion: 1,
      });
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
    const approverAuth = {
      user: { id: approver.id, email: approver.email, name: approver.name },
      sessionId: "demo",
      workspaceId,
      workspaceName: DEMO_WORKSPACE,
      roles: approver.roles,
    };
    storeRelease(tx, { rc: w1, yieldRunId: wrenRun, releasedBy: approverAuth, at: at(5) });
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

/** Whether the demo accounts exist in this database (they are printed at start-up only then). */
export function isDemoWorkspacePresent(db: Db): boolean {
  return (
    db.select({ id: users.id }).from(users).where(eq(users.email, DEMO_ADMIN_EMAIL)).limit(1).all().length > 0
  );
}

/**
 * The demo workspace, loaded when DEMO_DATA asks for it and the database is new (no workspace yet); null otherwise.
 * Called by the entry point (src/index.ts) after the context is built.
 */
export async function loadDemoData(env: Pick<Env, "DEMO_DATA">, db: Db): Promise<DemoSummary | null> {
  return env.DEMO_DATA && isNewDatabase(db) ? seedDemo(db) : null;
}
