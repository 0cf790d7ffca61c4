// Measured lots, part fits, calibration and witness films (apps/api/src/routes/domain/lots.ts). The nested
// physics results are the optics package's types, checked here for shape at the top level only.
import { z } from "zod";
import type {
  BuiltFitResult,
  Calibration,
  ErrorModel,
  FilmFitResult,
  LotYield,
  MeasuredSpectrum as OpticsMeasuredSpectrum,
  PartVerdict,
} from "@stackproof/optics";

const obj = <T>() => z.custom<T>((v) => typeof v === "object" && v !== null);

export const SpectraPreviewSchema = z.object({
  fileName: z.string(),
  delimiter: z.enum([",", ";", "tab"]),
  decimalComma: z.boolean(),
  detectedScale: z.enum(["percent", "fraction"]),
  reversed: z.boolean(),
  rows: z.number(),
  wavelengthRange: z.tuple([z.number(), z.number()]),
  columns: z.array(z.string()),
});
export type SpectraPreview = z.infer<typeof SpectraPreviewSchema>;

export const LotSummarySchema = obj<LotYield & { predictedRunId: string | null }>();
export type LotSummary = z.infer<typeof LotSummarySchema>;

export const LotPartSchema = z.object({
  id: z.string(),
  label: z.string(),
  status: z.enum(["pass", "fail", "incomplete"]),
  verdict: obj<PartVerdict>(),
  measurements: z.custom<OpticsMeasuredSpectrum[]>((v) => Array.isArray(v)),
  fit: obj<Omit<BuiltFitResult, "design">>().nullable(),
  fittedAt: z.string().nullable(),
});
export type LotPart = z.infer<typeof LotPartSchema>;

export const LotSchema = z.object({
  id: z.string(),
  programId: z.string(),
  revisionId: z.string(),
  runId: z.string(),
  runDate: z.string(),
  chamber: z.string(),
  notes: z.string(),
  guardK: z.number(),
  createdAt: z.string(),
  summary: LotSummarySchema,
  parts: z.array(LotPartSchema).optional(),
});
export type Lot = z.infer<typeof LotSchema>;
export const LotListResponse = z.object({ items: z.array(LotSchema) });

export const CalibrationResponse = z.object({
  current: obj<ErrorModel>(),
  calibration: obj<Calibration>().nullable(),
  history: z.array(
    z.object({
      lotId: z.string(),
      runId: z.string(),
      runDate: z.string(),
      revisionId: z.string(),
      summary: LotSummarySchema,
    }),
  ),
  adoptWith: z.string(),
});
export type CalibrationView = z.infer<typeof CalibrationResponse>;

export const WitnessFitResponse = z.object({
  materialId: z.string(),
  fit: obj<Omit<FilmFitResult, "fitted">>(),
});

/** POST /parts/:id/fit: fit the index scale too (default), and which baseline terms are fixed or fitted. */
export const PartFitBody = z.object({
  fitIndexScale: z.boolean().default(true),
  baseline: z
    .object({
      scale: z.union([z.number().positive(), z.literal("fit")]).optional(),
      offset: z.union([z.number(), z.literal("fit")]).optional(),
      shiftNm: z.union([z.number(), z.literal("fit")]).optional(),
    })
    .default({}),
});
export type PartFitInput = z.input<typeof PartFitBody>;
