// Measured spectra attached to a revision (a spectrophotometer trace of a built part, drawn over the design).
import { eq } from "drizzle-orm";
import type { Db } from "../db/client.ts";
import { measurements } from "../db/schema.ts";
import { recordAudit } from "../lib/audit.ts";
import { newId } from "./canonical.ts";
import type { Actor } from "./deps.ts";
import type { RevisionContext } from "./load.ts";

export type MeasurementRow = typeof measurements.$inferSelect;

/** A measurement as the API shows it. */
export function measurementView(m: MeasurementRow) {
  return {
    id: m.id,
    revisionId: m.revisionId,
    label: m.label,
    quantity: m.quantity,
    angleDeg: m.angleDeg,
    polarization: m.polarization,
    wavelengths: m.wavelengths,
    values: m.values,
    createdAt: m.createdAt.toISOString(),
  };
}

export interface NewMeasurement {
  label: string;
  quantity: MeasurementRow["quantity"];
  angleDeg: number;
  polarization: MeasurementRow["polarization"];
  wavelengths: number[];
  values: number[];
}

/** Attaches a parsed measured spectrum to a revision; returns the stored row. */
export function addMeasurement(
  db: Db,
  input: { workspaceId: string; actor: Actor; rc: RevisionContext; measurement: NewMeasurement },
): MeasurementRow {
  const { workspaceId, actor, rc, measurement: m } = input;
  const id = newId();
  db.transaction((tx) => {
    tx.insert(measurements)
      .values({
        id,
        revisionId: rc.revision.id,
        label: m.label,
        quantity: m.quantity,
        angleDeg: m.angleDeg,
        polarization: m.polarization,
        wavelengths: m.wavelengths,
        values: m.values,
        createdBy: actor.id,
        createdAt: new Date(),
      })
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "measurement.added",
      subjectType: "revision",
      subjectId: rc.revision.id,
      summary: `${actor.name} attached a measured ${m.quantity} spectrum to ${rc.design.name} rev ${rc.revision.number}`,
    });
  });
  const row = db.select().from(measurements).where(eq(measurements.id, id)).get();
  if (!row) throw new Error("measurement not stored");
  return row;
}
