import { useHealth } from "../api/get-health.ts";

/** Small status pill in the shell: is the server up and its database migrated? */
export function HealthBadge() {
  const { data, isPending, isError } = useHealth();
  const ok = data?.status === "ok";
  const label = isPending
    ? "Checking server…"
    : isError
      ? "Server unreachable"
      : ok
        ? "Server healthy"
        : "Server degraded";
  return (
    <span
      role="status"
      aria-live="polite"
      title={
        data
          ? `API ${data.version} · engine ${data.engineVersion} · migrations ${data.migrations.applied}/${data.migrations.available}`
          : undefined
      }
      className="inline-flex items-center gap-1.5 rounded-full border border-ink-700 px-2.5 py-0.5 text-xs text-ink-100"
    >
      <span
        aria-hidden
        className={`h-2 w-2 rounded-full ${isPending ? "bg-ink-300" : ok ? "bg-film-teal-soft" : "bg-film-amber-soft"}`}
      />
      {label}
    </span>
  );
}
