// Fair scheduling of chunked runs (common practice, no source: round-robin over runs, as in OS schedulers).
import { describe, expect, it } from "vitest";
import { createFairScheduler } from "../../src/cli/scheduler.ts";
import { planChunks } from "../../src/studies/index.ts";

/** Executions that finish when the test says so, recording the order they started in. */
function manualExec() {
  const started: string[] = [];
  const resolvers: (() => void)[] = [];
  return {
    started,
    exec: (id: string) => (start: number) => {
      started.push(`${id}:${start}`);
      return new Promise<number>((resolve) => resolvers.push(() => resolve(start)));
    },
    async finishOne() {
      resolvers.shift()?.();
      await new Promise((r) => setTimeout(r, 0));
    },
  };
}

describe("createFairScheduler", () => {
  it("a small run added behind a large one waits for at most one chunk per slot", async () => {
    const m = manualExec();
    const s = createFairScheduler(2);
    const settled: string[] = [];
    const run = (id: string, trials: number) => ({
      id,
      pending: planChunks(trials, 250),
      exec: m.exec(id),
      onChunk: () => {},
      onError: () => {},
      onSettled: (complete: boolean) => settled.push(`${id}:${complete}`),
    });
    s.add(run("large", 200_000)); // 800 chunks
    expect(m.started).toEqual(["large:0", "large:250"]);
    s.add(run("small", 500)); // 2 chunks
    await m.finishOne(); // one slot frees: the small run gets it
    expect(m.started[2]).toBe("small:0");
    await m.finishOne(); // the other slot: round-robin goes back to the large run
    expect(m.started[3]).toBe("large:500");
    await m.finishOne();
    expect(m.started[4]).toBe("small:250");
    await m.finishOne();
    await m.finishOne();
    expect(settled).toEqual(["small:true"]);
  });

  it("a stopped run starts no more chunks and settles once its chunk in flight is back", async () => {
    const m = manualExec();
    const s = createFairScheduler(1);
    let settled: boolean | null = null;
    s.add({
      id: "a",
      pending: planChunks(10_000, 250),
      exec: m.exec("a"),
      onChunk: () => {},
      onError: () => {},
      onSettled: (c: boolean) => (settled = c),
    });
    const stopped = s.stop("a");
    expect(settled).toBeNull(); // its first chunk is still computing
    await m.finishOne();
    await stopped;
    expect(settled).toBe(false);
    expect(m.started).toEqual(["a:0"]);
    expect(s.has("a")).toBe(false);
  });

  it("a failing chunk fails its run and leaves the other runs going", async () => {
    const s = createFairScheduler(1);
    const errors: unknown[] = [];
    const done: string[] = [];
    s.add({
      id: "bad",
      pending: [[0, 1]],
      exec: () => Promise.reject(new RangeError("design.layers[0].thickness: got NaN")),
      onChunk: () => {},
      onError: (e: unknown) => errors.push(e),
      onSettled: (c: boolean) => done.push(`bad:${c}`),
    });
    s.add({
      id: "good",
      pending: [[0, 1]],
      exec: () => Promise.resolve(1),
      onChunk: () => {},
      onError: (e: unknown) => errors.push(e),
      onSettled: (c: boolean) => done.push(`good:${c}`),
    });
    await s.drained();
    await new Promise((r) => setTimeout(r, 0));
    expect(errors).toHaveLength(1);
    expect(done.sort()).toEqual(["bad:false", "good:true"]);
  });
});
