import { useHealth } from "../../features/health/api/get-health.ts";

export function Component() {
  const { data } = useHealth();
  return (
    <section aria-labelledby="home-title">
      <h1 id="home-title" className="text-2xl font-semibold tracking-tight">
        Coating designs, proven before they reach the chamber
      </h1>
      <p className="mt-2 max-w-2xl text-ink-700">
        Check a multilayer design against its spec mask, measure its yield under real process errors, review it and
        release it with a record anyone can reproduce.
      </p>
      {data && (
        <p className="mt-6 font-mono text-xs text-ink-500">
          API {data.version} · optics engine {data.engineVersion} · database {data.database}
        </p>
      )}
    </section>
  );
}
