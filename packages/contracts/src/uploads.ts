// The text fields of the API's multipart uploads (the file itself is described by the API's multer route). Each
// route validates its form with one of these, extended by its file field; the web's forms send these names.
import { z } from "zod";

const MATERIAL_ID = z
  .string()
  .trim()
  .regex(/^[A-Za-z0-9][A-Za-z0-9_.+-]{0,63}$/, {
    message: "use 1-64 letters, digits, _ . + - (starting with a letter or digit)",
  });

const ANGLE_DEG = z.coerce.number().min(0).lt(90).default(0);
const POLARIZATION = z.enum(["s", "p", "u"]).default("u");

/** POST /imports/design: optional overrides of the uploaded design's name, λ0 and media. */
export const DesignImportFields = z.object({
  name: z.string().trim().max(200).optional(),
  referenceWavelength: z.coerce.number().positive().max(100000).optional(),
  substrate: z.string().trim().max(100).optional(),
  substrateThicknessMm: z.coerce.number().min(0).max(1000).optional(),
  incident: z.string().trim().max(100).optional(),
});

/** POST /materials: a workspace material uploaded as an n,k table. */
export const MaterialUploadFields = z.object({
  id: MATERIAL_ID,
  name: z.string().trim().min(1).max(200),
  role: z.enum(["layer", "substrate", "medium", "metal"]).default("layer"),
  source: z.string().trim().max(500).optional(),
});

/** POST /revisions/:id/measurements: one measured R or T spectrum of a part. */
export const MeasurementUploadFields = z.object({
  label: z.string().trim().max(200).optional(),
  scale: z.enum(["percent", "fraction"]).optional().meta({
    description:
      "How the values are written (POST /lots/preview detects it for the user to confirm); required when every value lies within 0–1",
  }),
  quantity: z.enum(["R", "T"]).optional().meta({
    description: "R or T; required when the column header does not say (R, T, %T, Reflectance, …)",
  }),
  angleDeg: ANGLE_DEG,
  polarization: POLARIZATION,
});

/** The spectra of a lot's parts (one column per part); scale and quantity are checked after scoping. */
export const LotSpectraFields = z.object({
  // required, but checked after the lot or revision is found (another workspace gets 404 before any 400)
  scale: z.enum(["percent", "fraction"]).optional().meta({
    description:
      "Required: how the values are written; POST /lots/preview detects it for the user to confirm",
  }),
  quantity: z.enum(["R", "T"]).optional().meta({ description: "Required" }),
  angleDeg: ANGLE_DEG,
  polarization: POLARIZATION,
  uncertaintyPct: z.coerce.number().positive().max(50).default(0.2),
});

/** POST /revisions/:id/lots: a lot of measured parts from one coating run. */
export const LotUploadFields = LotSpectraFields.extend({
  runId: z.string().trim().min(1).max(100).optional().meta({ description: "Required" }),
  runDate: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, { message: "use YYYY-MM-DD" })
    .optional()
    .meta({ description: "Required" }),
  chamber: z.string().trim().max(100).default(""),
  notes: z.string().trim().max(2000).default(""),
  guardK: z.coerce.number().min(0).max(5).default(2),
});

/** POST /materials/witness-fit: the film's name, substrate and fit limits. */
export const WitnessFitFields = z.object({
  scale: z.enum(["percent", "fraction"]),
  id: MATERIAL_ID,
  name: z.string().trim().min(1).max(200),
  substrate: z.string().trim().min(1).max(100),
  substrateThicknessMm: z.coerce.number().positive().max(100),
  backside: z.enum(["true", "false"]).default("true"),
  uncertaintyPct: z.coerce.number().positive().max(50).default(0.2),
  minThicknessNm: z.coerce.number().positive().default(50),
  maxThicknessNm: z.coerce.number().positive().default(3000),
});
