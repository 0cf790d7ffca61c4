import type { SpecBand } from "@stackproof/optics";
import type { ReviewThread, ThreadAnchor } from "../api/threads.ts";

export function describeAnchor(anchor: ThreadAnchor, bands: readonly SpecBand[]): string {
  switch (anchor.kind) {
    case "band": {
      const b = bands.find((x) => x.id === anchor.bandId);
      return b ? `Band ${b.label ?? b.id} (${b.start}–${b.stop} nm)` : `Band ${anchor.bandId}`;
    }
    case "range":
      return `${anchor.start}–${anchor.stop} nm`;
    case "layer":
      return `Layer ${anchor.index + 1}`;
    case "design":
      return "Whole design";
  }
}

/** Wavelength span of a thread's anchor, for markers on the chart (bands and ranges only). */
export function anchorSpan(anchor: ThreadAnchor, bands: readonly SpecBand[]): { start: number; stop: number } | null {
  if (anchor.kind === "range") return { start: anchor.start, stop: anchor.stop };
  if (anchor.kind === "band") {
    const b = bands.find((x) => x.id === anchor.bandId);
    return b ? { start: b.start, stop: b.stop } : null;
  }
  return null;
}

export function openLayerThreads(threads: readonly ReviewThread[]): Set<number> {
  return new Set(threads.filter((t) => t.status === "open" && t.anchor.kind === "layer").map((t) => (t.anchor as { index: number }).index));
}

/** The @mention being typed at the caret: the text after the last "@" up to the caret, if it has no space. */
export function mentionQuery(text: string, caret: number): { start: number; query: string } | null {
  const before = text.slice(0, caret);
  const at = before.lastIndexOf("@");
  if (at < 0) return null;
  if (at > 0 && !/\s/.test(before[at - 1] ?? "")) return null;
  const q = before.slice(at + 1);
  if (/\s/.test(q)) return null;
  return { start: at, query: q };
}
