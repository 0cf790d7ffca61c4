// Bounded loopback load on the built server while a 20,000-trial verified run computes on its pool:
// requests/s and latency percentiles for /api/health and a signed-in list, with autocannon.
//   pnpm --filter @stackproof/api build && (cd apps/api && node --import tsx ../../tests/bench/server-load.ts)
import autocannon from "autocannon";
import { designFromQwots } from "@stackproof/optics";
import { DEMO, startProduct } from "../browser/support/harness.ts";

const CONNECTIONS = 10;
const SECONDS = 10;

const product = await startProduct({
  env: { YIELD_WORKERS: "2", LOG_LEVEL: "warn", MAX_ACTIVE_RUNS_PER_USER: "10" },
});
try {
  const headers = { "Content-Type": "application/json", Origin: product.url };
  const signIn = await fetch(`${product.url}/api/v1/auth/sign-in`, {
    method: "POST",
    headers,
    body: JSON.stringify({ email: DEMO.designer, password: DEMO.password }),
  });
  const cookie = (signIn.headers.get("set-cookie") ?? "").split(";")[0] ?? "";
  const auth = { ...headers, Cookie: cookie };
  const overview = await (await fetch(`${product.url}/api/v1/programs`, { headers: auth })).json();
  const programId = (overview.items ?? overview)[0].id as string;
  const created = await fetch(`${product.url}/api/v1/programs/${programId}/designs`, {
    method: "POST",
    headers: auth,
    body: JSON.stringify({
      name: "Load bench",
      note: "bench",
      stack: designFromQwots({
        name: "Load bench",
        referenceWavelength: 550,
        layers: Array.from({ length: 24 }, (_, i) => ({ material: i % 2 ? "MgF2" : "Al2O3", qwot: 1 })),
        substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
      }),
    }),
  });
  const revisionId = (await created.json()).revision.id as string;
  const run = await fetch(`${product.url}/api/v1/revisions/${revisionId}/yield-runs`, {
    method: "POST",
    headers: auth,
    body: JSON.stringify({ trials: 20000, seed: "load" }),
  });
  if (run.status !== 202) throw new Error(`could not start the run: ${run.status} ${await run.text()}`);
  const runId = (await run.json()).run.id as string;

  const load = async (path: string, withCookie: boolean) => {
    const r = await autocannon({
      url: `${product.url}${path}`,
      connections: CONNECTIONS,
      duration: SECONDS,
      headers: withCookie ? { cookie } : {},
    });
    return {
      path,
      rps: Math.round(r.requests.average),
      p50: r.latency.p50,
      p99: r.latency.p99,
      errors: r.errors,
      non2xx: r.non2xx,
    };
  };
  const results = [await load("/api/health", false), await load(`/api/v1/programs`, true)];
  const status = await (await fetch(`${product.url}/api/v1/yield-runs/${runId}`, { headers: auth })).json();
  console.log(
    JSON.stringify(
      {
        connections: CONNECTIONS,
        seconds: SECONDS,
        results,
        run: { status: status.status, progress: status.progress },
      },
      null,
      2,
    ),
  );
} finally {
  await product.stop();
}
