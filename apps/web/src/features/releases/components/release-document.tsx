import type { ReactNode } from "react";
import { bandConditionsText, describeBandIso, describeColourIso, type SpecBand } from "@stackproof/optics";
import { ProtectiveCaution } from "../../../components/protective-caution.tsx";
import { describeRequirement } from "../../../components/spec-mask-table.tsx";
import { ErrorModelSummary } from "../../../components/error-model-summary.tsx";
import { StatusPill, revisionStatuses, type RevisionStatus } from "../../../components/ui/index.ts";
import { formatDateTime, formatPercent, formatTarget } from "../../../lib/format.ts";
import { cx } from "../../../components/ui/cx.ts";
import type { PlotSeries, ReleaseRecord } from "../api/get-release.ts";

const actionText: Record<string, string> = {
  submit: "Submitted for review",
  request_changes: "Sent back for rework",
  approve: "Signed off",
  release: "Released",
  withdraw: "Withdrawn",
  return_to_review: "Returned to review (program changed)",
};

function anchorText(
  a: ReleaseRecord["threads"]["items"][number]["anchor"],
  bandLabels: Map<string, string>,
): string {
  if (a.kind === "band") return `band ${bandLabels.get(a.bandId ?? "") ?? a.bandId ?? "?"}`;
  if (a.kind === "range") return `${a.start}–${a.stop} nm`;
  if (a.kind === "layer") return `layer ${(a.index ?? 0) + 1}`;
  return "whole design";
}

function Section({ title, children, className }: { title: string; children: ReactNode; className?: string }) {
  return (
    <section className={cx("release-section mt-8", className)}>
      <h2 className="border-b-2 border-ink-900 pb-1 text-base font-semibold tracking-tight">{title}</h2>
      <div className="mt-3">{children}</div>
    </section>
  );
}

const th =
  "border-b border-ink-300 py-1.5 pr-3 text-left text-xs font-semibold tracking-wide text-ink-500 uppercase";
const td = "border-b border-ink-100 py-1.5 pr-3 align-top";

/** The band's conditions in words, as a plot series states them (null when the stored band cannot say). */
function conditionsOf(b: SpecBand): string | null {
  try {
    return bandConditionsText(b);
  } catch {
    return null;
  }
}

/**
 * Runs of sample indices drawn as one line or shaded area: split where the wavelengths jump by more than three times
 * the steps on either side (the gap between two bands), so nothing is drawn where nothing was computed.
 */
function segmentsOf(wl: readonly number[]): number[][] {
  const step = (i: number) => {
    const a = wl[i - 1];
    const b = wl[i];
    return a === undefined || b === undefined ? 0 : b - a;
  };
  const out: number[][] = [];
  let run: number[] = [];
  wl.forEach((_, i) => {
    const around = Math.max(step(i - 1), step(i + 1));
    if (run.length > 0 && around > 0 && step(i) > 3 * around) {
      out.push(run);
      run = [];
    }
    run.push(i);
  });
  if (run.length > 0) out.push(run);
  return out;
}

/** Nominal (line), 5–95 % envelope (shaded) and band limits (red), drawn from the stored numbers as SVG. */
function EnvelopePlot({
  series: p,
  bands,
}: {
  series: PlotSeries;
  bands: ReleaseRecord["revision"]["specMask"]["bands"];
}) {
  const W = 640;
  const H = 220;
  const m = { l: 44, r: 8, t: 8, b: 30 };
  const xs = p.wavelengths.filter(Number.isFinite);
  // The limits of the bands evaluated under this series' conditions (a cone, an angle range or "s and p each" has a
  // series of its own) that it has samples of; older records without conditions match angle and polarization.
  const mine = bands.filter((b) => {
    const c = p.conditions !== undefined ? conditionsOf(b as SpecBand) : null;
    return (
      b.quantity === p.quantity &&
      (c !== null ? c === p.conditions : b.polarization === p.polarization && b.angleDeg === p.angleDeg) &&
      p.wavelengths.some((w) => w >= b.start && w <= b.stop)
    );
  });
  const caption = `${p.quantity} (${p.quantity === "OD" ? "optical density" : "%"}), ${p.conditions ?? `${p.angleDeg}°, polarization ${p.polarization}`}`;
  const segments = segmentsOf(p.wavelengths);
  const ys = [...p.nominal, ...(p.low ?? []), ...(p.high ?? []), ...mine.map((b) => b.value)].filter(
    (v): v is number => typeof v === "number" && Number.isFinite(v),
  );
  const x0 = xs.length ? Math.min(...xs) : 0;
  const x1 = xs.length && Math.max(...xs) > x0 ? Math.max(...xs) : x0 + 1;
  const od = p.quantity === "OD";
  const y0 = od ? (ys.length ? Math.min(...ys) : 0) : 0;
  const y1raw = ys.length ? Math.max(...ys) : 1;
  const y1 = od ? (y1raw > y0 ? y1raw : y0 + 1) : Math.min(100, Math.max(y1raw * 1.05, 1));
  const X = (x: number) => m.l + ((x - x0) / (x1 - x0)) * (W - m.l - m.r);
  const Y = (y: number) => H - m.b - ((y - y0) / (y1 - y0)) * (H - m.t - m.b);
  const line = (vals: (number | null)[]) =>
    segments
      .map((run) =>
        run
          .map((i) => {
            const v = vals[i];
            return v === null || v === undefined
              ? null
              : `${X(p.wavelengths[i] as number).toFixed(1)},${Y(v).toFixed(1)}`;
          })
          .reduce<string>(
            (d, pt, k, all) => (pt === null ? d : `${d}${k > 0 && all[k - 1] !== null ? "L" : "M"}${pt}`),
            "",
          ),
      )
      .join("");
  const lo = p.low;
  const hi = p.high;
  const polys =
    lo && hi
      ? segments
          .map((run) => run.filter((i) => lo[i] != null && hi[i] != null))
          .filter((idx) => idx.length > 1)
          .map((idx) =>
            [
              ...idx.map(
                (i) => `${X(p.wavelengths[i] as number).toFixed(1)},${Y(hi[i] as number).toFixed(1)}`,
              ),
              ...idx
                .slice()
                .reverse()
                .map((i) => `${X(p.wavelengths[i] as number).toFixed(1)},${Y(lo[i] as number).toFixed(1)}`),
            ].join(" "),
          )
      : [];
  const ticks = (a: number, b: number) => [0, 1, 2, 3, 4].map((k) => a + ((b - a) * k) / 4);
  return (
    <figure className="mb-4" data-testid="release-plot">
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full"
        role="img"
        aria-label={`${caption}: nominal and 5–95 % envelope against the mask`}
      >
        {polys.map((pts, k) => (
          <polygon key={k} points={pts} fill="#9fb7c9" fillOpacity={0.55} />
        ))}
        {mine.map((b) => (
          <line
            key={b.id}
            x1={X(b.start)}
            x2={X(b.stop)}
            y1={Y(b.value)}
            y2={Y(b.value)}
            stroke="#b3261e"
            strokeWidth={2.5}
          />
        ))}
        <path d={line(p.nominal)} fill="none" stroke="#1b1f1d" strokeWidth={1.4} />
        <line x1={m.l} x2={W - m.r} y1={H - m.b} y2={H - m.b} stroke="#1b1f1d" />
        <line x1={m.l} x2={m.l} y1={m.t} y2={H - m.b} stroke="#1b1f1d" />
        {ticks(x0, x1).map((x) => (
          <text key={`x${x}`} x={X(x)} y={H - m.b + 12} fontSize={9} textAnchor="middle">
            {x.toFixed(0)}
          </text>
        ))}
        {ticks(y0, y1).map((y) => (
          <text key={`y${y}`} x={m.l - 4} y={Y(y) + 3} fontSize={9} textAnchor="end">
            {y.toFixed(od || y1 - y0 < 5 ? 1 : 0)}
          </text>
        ))}
        <text x={(m.l + W - m.r) / 2} y={H - 4} fontSize={10} textAnchor="middle">
          Wavelength (nm)
        </text>
      </svg>
      <figcaption className="text-xs text-ink-500">
        {caption}: nominal (black), {p.lowP ?? 5}–{p.highP ?? 95} % envelope of the evidence run (shaded),
        band limits (red).
      </figcaption>
    </figure>
  );
}

/** A release record laid out as a document to file: identity, result, specification, stack, decisions. */
export function ReleaseDocument({ record: r }: { record: ReleaseRecord }) {
  const status = (revisionStatuses as readonly string[]).includes(r.status)
    ? (r.status as RevisionStatus)
    : null;
  const y = r.yieldRun;
  const ev = r.evidence ?? null;
  // Releases filed before evidence rules compared the point yield; later ones the lower bound.
  const meets = ev ? ev.figures.pass : y ? y.yield >= r.program.targetYield : false;
  const outcomes = new Map(r.nominal.bands.map((b) => [b.id, b]));
  const failures = new Map((y?.bandFailures ?? []).map((b) => [b.id, b.count]));
  const stack = r.revision.stack;
  const bandLabels = new Map(r.revision.specMask.bands.map((b) => [b.id, b.label ?? b.id]));

  return (
    <article
      className="release-sheet mx-auto max-w-[210mm] bg-white px-[14mm] py-[12mm] shadow-md print:max-w-none print:p-0 print:shadow-none"
      aria-labelledby="release-title"
    >
      <header className="flex flex-wrap items-start gap-4 border-b-4 border-double border-ink-900 pb-4">
        <div className="min-w-0 flex-1">
          <p className="text-xs font-semibold tracking-[0.18em] text-ink-500 uppercase">
            Release record · {r.workspace.name}
          </p>
          <h1 id="release-title" className="mt-1 text-2xl font-semibold tracking-tight">
            {r.design.name} <span className="font-mono">r{r.revision.number}</span>
          </h1>
          <p className="mt-1 text-sm text-ink-700">
            Program {r.program.name}
            {r.program.customer ? ` for ${r.program.customer}` : ""}
            {r.program.application ? ` · ${r.program.application}` : ""}
          </p>
        </div>
        <div className="text-right text-sm">
          {status ? <StatusPill status={status} /> : <span className="font-mono">{r.status}</span>}
          <p className="mt-2 text-ink-700">Released {formatDateTime(r.releasedAt)}</p>
          <p className="text-ink-700">by {r.releasedBy.name}</p>
        </div>
      </header>

      {r.status === "withdrawn" && (
        <p
          role="alert"
          className="mt-4 border-2 border-verdict-fail px-4 py-2 font-semibold text-verdict-fail print:border-black print:text-black"
        >
          This release was withdrawn afterwards. Do not use it for production.
        </p>
      )}
      {(r.program.protective || r.caution) && (
        <ProtectiveCaution className="mt-4" application={r.program.application || null} text={r.caution} />
      )}

      <Section title="Identity">
        <dl className="grid grid-cols-[12rem_1fr] gap-x-4 gap-y-1.5 text-sm max-sm:grid-cols-1">
          <dt className="text-ink-500">Release</dt>
          <dd className="font-mono">{r.id}</dd>
          <dt className="text-ink-500">Revision</dt>
          <dd>
            r{r.revision.number}, written by {r.revision.author?.name ?? "unknown"} on{" "}
            {formatDateTime(r.revision.createdAt)}
          </dd>
          <dt className="text-ink-500">Content hash</dt>
          <dd className="font-mono text-xs break-all">{r.revision.hash}</dd>
          {r.revision.note && (
            <>
              <dt className="text-ink-500">Revision note</dt>
              <dd>{r.revision.note}</dd>
            </>
          )}
        </dl>
      </Section>

      <Section title="Evidence">
        {ev ? (
          <dl
            className="mb-4 grid grid-cols-[12rem_1fr] gap-x-4 gap-y-1.5 text-sm max-sm:grid-cols-1"
            data-testid="release-evidence"
          >
            <dt className="text-ink-500">Lower bound</dt>
            <dd>
              <strong className="font-mono tabular">{formatPercent(ev.figures.lowerBound)}</strong> (two-sided
              Wilson interval at {Math.round(ev.figures.confidence * 100)} % confidence) against the target{" "}
              {formatTarget(ev.figures.targetYield)}: <strong>{ev.figures.pass ? "met" : "not met"}</strong>
            </dd>
            <dt className="text-ink-500">Evidence rules</dt>
            <dd>
              at least {ev.figures.minTrials.toLocaleString("en-GB")} trials; program version{" "}
              {ev.programVersion}
            </dd>
            <dt className="text-ink-500">Seed rule</dt>
            <dd className="text-xs">{ev.seedRule}</dd>
          </dl>
        ) : (
          <p className="mb-4 text-sm text-ink-700">
            Filed before evidence rules were recorded: no lower bound is stored with this release.
          </p>
        )}
        {y ? (
          <div className="flex flex-wrap items-start gap-6">
            <div>
              <p
                className={cx(
                  "font-mono text-3xl font-semibold tabular",
                  meets ? "text-verdict-pass" : "text-verdict-fail",
                  "print:text-black",
                )}
              >
                {formatPercent(y.yield)}
              </p>
              <p className="font-mono text-sm text-ink-700 tabular">
                {Math.round((y.interval.confidence ?? 0.95) * 100)} % interval {formatPercent(y.interval.low)}{" "}
                – {formatPercent(y.interval.high)}
              </p>
              <p className="mt-1 text-sm font-semibold">
                Target {formatTarget(r.program.targetYield)}: {meets ? "met" : "not met"}
              </p>
            </div>
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-ink-500">Trials</dt>
              <dd className="font-mono tabular">
                {y.passCount.toLocaleString("en-GB")} of {y.trials.toLocaleString("en-GB")} passed
              </dd>
              <dt className="text-ink-500">Seed</dt>
              <dd className="font-mono">{y.seed}</dd>
              <dt className="text-ink-500">Engine</dt>
              <dd className="font-mono">{y.engineVersion}</dd>
              <dt className="text-ink-500">Run</dt>
              <dd className="font-mono text-xs">
                {y.id} · {y.verified ? "verified by the server" : "not verified"}
                {y.finishedAt ? ` · ${formatDateTime(y.finishedAt)}` : ""}
              </dd>
            </dl>
            <div className="basis-full">
              <p className="mb-1 text-xs font-semibold tracking-wide text-ink-500 uppercase">
                Error model of the run
              </p>
              <ErrorModelSummary model={y.errorModel} />
            </div>
          </div>
        ) : (
          <p className="text-sm text-verdict-fail">No verified yield run is attached to this release.</p>
        )}
      </Section>

      {r.plot && r.plot.length > 0 && (
        <Section title="Spectrum against the mask">
          {r.plot.map((p, i) => (
            <EnvelopePlot
              // several series can share quantity, angle and polarization (a cone and a field at 0°): the index keys
              key={i}
              series={p}
              bands={r.revision.specMask.bands}
            />
          ))}
        </Section>
      )}

      <Section title="Spec deviations">
        {!r.deviation ? (
          <p className="text-sm text-ink-500">
            Not recorded for releases filed before spec deviations existed.
          </p>
        ) : !r.deviation.required ? (
          <p className="text-sm">None: the revision carries the program's mask.</p>
        ) : (
          <div className="text-sm" data-testid="release-deviation">
            <p>
              The revision's mask differs from the program's:{" "}
              {r.deviation.bands.map((b) => `${b.id} ${b.change}`).join(", ")}.
            </p>
            {r.deviation.current ? (
              <p className="mt-1">
                Deviation <strong>{r.deviation.current.status}</strong>: “{r.deviation.current.reason}” —
                asked for by {r.deviation.current.requestedBy?.name ?? "—"}
                {r.deviation.current.decidedBy
                  ? `, decided by ${r.deviation.current.decidedBy.name}${r.deviation.current.decidedAt ? ` on ${formatDateTime(r.deviation.current.decidedAt)}` : ""}`
                  : ""}
                .
              </p>
            ) : null}
          </div>
        )}
      </Section>

      <Section title="Spec mask and nominal result">
        <table className="w-full border-collapse text-sm">
          <thead>
            <tr>
              <th className={th}>Band</th>
              <th className={th}>Range (nm)</th>
              <th className={th}>Quantity</th>
              <th className={th}>Requirement</th>
              <th className={th}>Nominal</th>
              <th className={cx(th, "text-right")}>Margin</th>
              {y && <th className={cx(th, "text-right")}>Failed trials</th>}
            </tr>
          </thead>
          <tbody>
            {r.revision.specMask.bands.map((b) => {
              const o = outcomes.get(b.id);
              return (
                <tr key={b.id}>
                  <td className={td}>{b.label ?? b.id}</td>
                  <td className={cx(td, "font-mono tabular")}>
                    {b.start}–{b.stop}
                  </td>
                  <td className={cx(td, "font-mono")}>
                    {b.quantity} {b.angleDeg}° {b.polarization}
                  </td>
                  <td className={td} title={describeRequirement(b)}>
                    {describeBandIso(b)}
                  </td>
                  <td
                    className={cx(
                      td,
                      "font-semibold",
                      o?.pass ? "text-verdict-pass" : "text-verdict-fail",
                      "print:text-black",
                    )}
                  >
                    {o ? (o.pass ? "pass" : "FAIL") : "—"}
                  </td>
                  <td className={cx(td, "text-right font-mono tabular")}>{o ? o.margin.toFixed(3) : "—"}</td>
                  {y && <td className={cx(td, "text-right font-mono tabular")}>{failures.get(b.id) ?? 0}</td>}
                </tr>
              );
            })}
            {(r.revision.specMask.colour ?? []).map((c) => {
              const o = outcomes.get(c.id);
              return (
                <tr key={c.id} data-colour-requirement={c.id}>
                  <td className={td}>{c.label ?? c.id}</td>
                  <td className={cx(td, "font-mono tabular")}>380–780</td>
                  <td className={cx(td, "font-mono")}>
                    {o?.colour ? (
                      <>
                        <span
                          className="mr-1 inline-block h-3 w-5 rounded border border-ink-300 align-middle print:border-black"
                          style={{ backgroundColor: o.colour.swatch }}
                          aria-hidden
                        />
                        L* {o.colour.L.toFixed(2)}, a* {o.colour.a.toFixed(2)}, b* {o.colour.b.toFixed(2)}
                      </>
                    ) : (
                      "colour"
                    )}
                  </td>
                  <td className={td}>{describeColourIso(c)}</td>
                  <td
                    className={cx(
                      td,
                      "font-semibold",
                      o?.pass ? "text-verdict-pass" : "text-verdict-fail",
                      "print:text-black",
                    )}
                  >
                    {o ? (o.pass ? "pass" : "FAIL") : "—"}
                  </td>
                  <td className={cx(td, "text-right font-mono tabular")}>
                    {o && Number.isFinite(o.margin) ? o.margin.toFixed(4) : "—"}
                  </td>
                  {y && <td className={cx(td, "text-right font-mono tabular")}>{failures.get(c.id) ?? 0}</td>}
                </tr>
              );
            })}
          </tbody>
        </table>
      </Section>

      <Section title="Layer stack">
        <p className="mb-2 text-sm text-ink-700">
          Deposition order: layer 1 sits on the substrate; light arrives from{" "}
          <span className="font-mono">{stack.incident ?? "air"}</span> on the last layer.
          {stack.referenceWavelength ? ` Reference wavelength ${stack.referenceWavelength} nm.` : ""}
        </p>
        <table className="w-full border-collapse text-sm">
          <thead>
            <tr>
              <th className={cx(th, "w-12 text-right")}>#</th>
              <th className={th}>Material</th>
              <th className={cx(th, "text-right")}>Thickness (nm)</th>
              <th className={th}>Note</th>
            </tr>
          </thead>
          <tbody>
            {stack.layers.map((l, i) => (
              <tr key={i}>
                <td className={cx(td, "text-right font-mono tabular")}>{i + 1}</td>
                <td className={cx(td, "font-mono")}>{l.material}</td>
                <td className={cx(td, "text-right font-mono tabular")}>{l.thickness.toFixed(2)}</td>
                <td className={td}>{[l.label, l.locked ? "locked" : ""].filter(Boolean).join(", ")}</td>
              </tr>
            ))}
            {stack.substrate && (
              <tr>
                <td className={cx(td, "text-right text-ink-500")}>sub.</td>
                <td className={cx(td, "font-mono")}>{stack.substrate.material}</td>
                <td className={cx(td, "text-right font-mono tabular")}>
                  {stack.substrate.thicknessMm !== undefined ? `${stack.substrate.thicknessMm} mm` : "—"}
                </td>
                <td className={td}>
                  substrate, under layer 1{stack.exit ? `; exit into ${stack.exit}` : ""}
                </td>
              </tr>
            )}
          </tbody>
        </table>
        <p className="mt-1 text-xs text-ink-500">
          {stack.layers.length} layers, {stack.layers.reduce((s, l) => s + l.thickness, 0).toFixed(1)} nm in
          total.
        </p>
      </Section>

      <Section title="Decisions">
        {r.decisions.length === 0 ? (
          <p className="text-sm text-ink-500">No decisions recorded.</p>
        ) : (
          <ol className="flex flex-col gap-2 text-sm">
            {r.decisions.map((d) => (
              <li
                key={d.id}
                className="release-decision grid grid-cols-[10rem_1fr] gap-x-4 border-l-2 border-film-teal pl-3 print:border-black max-sm:grid-cols-1"
              >
                <span className="font-mono text-xs text-ink-500 tabular">{formatDateTime(d.at)}</span>
                <span>
                  <strong>{actionText[d.action] ?? d.action}</strong> by {d.actor.name}
                  {d.note ? <span className="block text-ink-700">“{d.note}”</span> : null}
                  <span className="block font-mono text-[11px] text-ink-500">
                    hash {d.revisionHash.slice(0, 16)}…
                    {d.programVersion != null ? ` · program version ${d.programVersion}` : ""}
                  </span>
                </span>
              </li>
            ))}
          </ol>
        )}
      </Section>

      <Section title="Review threads">
        <p className="text-sm">
          {r.threads.total} thread{r.threads.total === 1 ? "" : "s"}: {r.threads.resolved} resolved,{" "}
          {r.threads.open} open at release.
        </p>
        {r.threads.items.length > 0 && (
          <table className="mt-2 w-full border-collapse text-sm">
            <thead>
              <tr>
                <th className={th}>On</th>
                <th className={th}>Severity</th>
                <th className={th}>State</th>
                <th className={th}>Opened by</th>
                <th className={th}>At revision</th>
              </tr>
            </thead>
            <tbody>
              {r.threads.items.map((t) => (
                <tr key={t.id}>
                  <td className={td}>{anchorText(t.anchor, bandLabels)}</td>
                  <td className={td}>{t.severity}</td>
                  <td className={td}>{t.status}</td>
                  <td className={td}>{t.author?.name ?? "—"}</td>
                  <td className={cx(td, "font-mono")}>r{t.revisionNumber}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Section>

      <footer className="mt-10 border-t border-ink-300 pt-2 text-xs text-ink-500">
        Stackproof release record {r.id} · revision hash {r.revision.hash.slice(0, 16)}… · anyone can re-run
        the yield study from the seed, trial count and error model above.
      </footer>
    </article>
  );
}
