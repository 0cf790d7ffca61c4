// Export of the design being edited: the optics JSON design format, or CSV one layer per row
// (material,thickness_nm,locked — the same columns POST /imports/design reads).
import type { Design } from "@stackproof/optics";

export function designToJson(design: Design): string {
  return JSON.stringify(design, null, 2) + "\n";
}

export function designToCsv(design: Design): string {
  const rows = design.layers.map((l) => `${l.material},${Number(l.thickness.toFixed(4))},${l.locked ? "true" : "false"}`);
  return ["material,thickness_nm,locked", ...rows].join("\n") + "\n";
}

export function fileBaseName(design: Design, revisionNumber?: number): string {
  const base = design.name.trim().replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^-+|-+$/g, "") || "design";
  return revisionNumber ? `${base}-r${revisionNumber}` : base;
}

export function downloadText(filename: string, text: string, type: string): void {
  const blob = new Blob([text], { type });
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
