// The compiled server as an operator runs it (node apps/api/dist/index.js): JSON request logs with request ids,
// compressed and correctly cached assets without public source maps, and SIGTERM that finishes every request in
// flight before the process exits 0.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO, startProduct, type Product } from "../browser/support/harness.ts";
import { heavyMask, heavyStack } from "../../apps/api/test/runtime/heavy.ts";

let product: Product;
let cookie = "";

async function api(path: string, init: RequestInit = {}) {
  return fetch(`${product.url}${path}`, {
    ...init,
    headers: {
      "Content-Type": "application/json",
      Origin: product.url,
      Cookie: cookie,
      ...(init.headers ?? {}),
    },
  });
}

beforeAll(async () => {
  product = await startProduct({ env: { LOG_LEVEL: "info", YIELD_WORKERS: "2" } });
  const res = await api("/api/v1/auth/sign-in", {
    method: "POST",
    body: JSON.stringify({ email: DEMO.designer, password: DEMO.password }),
  });
  expect(res.status).toBe(200);
  cookie = (res.headers.get("set-cookie") ?? "").split(";")[0] ?? "";
}, 120_000);
afterAll(async () => {
  await product?.stop();
});

/** The JSON lines the server logged (its banner lines are plain text and skipped). */
function logLines(): Record<string, unknown>[] {
  return product
    .output()
    .split("\n")
    .filter((l) => l.startsWith("{"))
    .map((l) => JSON.parse(l) as Record<string, unknown>);
}

describe("the built server", () => {
  it("logs one JSON line per request with the request id it echoes", async () => {
    const res = await api("/api/health", { headers: { "X-Request-Id": "ops-trace-7" } });
    expect(res.headers.get("x-request-id")).toBe("ops-trace-7");
    await new Promise((r) => setTimeout(r, 200));
    const lines = logLines().filter((l) => (l.req as { id?: string } | undefined)?.id === "ops-trace-7");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatchObject({
      level: 30,
      req: { method: "GET", url: "/api/health" },
      res: { statusCode: 200 },
    });
    expect(JSON.stringify(lines[0])).not.toContain("cookie");
  });

  it("serves the app shell no-cache and hashed assets immutable, compressed, without source maps", async () => {
    const shell = await fetch(`${product.url}/`);
    expect(shell.status).toBe(200);
    expect(shell.headers.get("cache-control")).toBe("no-cache");
    const html = await shell.text();
    const script = /src="(\/assets\/[^"]+\.js)"/.exec(html)?.[1];
    expect(script).toBeDefined();
    const asset = await fetch(`${product.url}${script}`, { headers: { "Accept-Encoding": "gzip" } });
    expect(asset.status).toBe(200);
    expect(asset.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
    expect(asset.headers.get("content-encoding")).toBe("gzip");
    expect((await asset.text()).includes("sourceMappingURL")).toBe(false);
    const brotli = await fetch(`${product.url}${script}`, { headers: { "Accept-Encoding": "br, gzip" } });
    expect(brotli.headers.get("content-encoding")).toBe("br");
    expect((await fetch(`${product.url}${script}.map`)).status).toBe(404);
    expect((await fetch(`${product.url}/assets/no-such-file.js`)).status).toBe(404);
  });

  it("on SIGTERM finishes all 50 requests in flight, then exits 0", async () => {
    const programs = await (await api("/api/v1/programs")).json();
    const programId = (programs.items ?? programs)[0].id as string;
    // A heavy revision: each view of it is a nominal evaluation on the pool, so 50 views stay in flight a while.
    const created = await api(`/api/v1/programs/${programId}/designs`, {
      method: "POST",
      body: JSON.stringify({
        name: "Heavy for shutdown",
        stack: heavyStack(),
        specMask: heavyMask(1),
        note: "load",
      }),
    });
    expect(created.status, await created.clone().text()).toBe(201);
    const revisionId = (await created.json()).revision.id as string;

    const exited = new Promise<number | null>((resolve) =>
      product.process.once("exit", (code) => resolve(code)),
    );
    const inFlight = Array.from({ length: 50 }, () =>
      api(`/api/v1/revisions/${revisionId}`).then(async (r) => ({ status: r.status, body: await r.json() })),
    );
    // Give the server time to accept every connection (on a loaded machine connections can wait in the kernel's
    // accept queue, and closing the listener resets those); the 50 evaluations take far longer than this.
    await new Promise((r) => setTimeout(r, 2000));
    product.process.kill("SIGTERM");
    const answers = await Promise.all(
      inFlight.map((p) => p.catch((e: Error) => ({ status: -1, body: { error: String(e.cause ?? e) } }))),
    );
    expect(answers.map((a) => a.status)).toEqual(Array(50).fill(200));
    expect(answers.every((a) => a.body.nominal.bands.length === 1)).toBe(true);
    expect(await exited).toBe(0);
    const messages = logLines().map((l) => l.msg);
    expect(messages).toContain("shutting down: no new connections, draining requests in flight");
    expect(messages[messages.length - 1]).toBe("stopped");
  }, 180_000);
});
