// Schema of the tolerance-study form: the optics ErrorModelSchema plus trials and seed.
import { z } from "zod";
import { ErrorModelSchema, MAX_TRIALS } from "@stackproof/optics";
import type { ErrorModel } from "@stackproof/optics";

export const StudyFormSchema = z.object({
  errorModel: ErrorModelSchema,
  trials: z
    .number({ error: "Enter a whole number of trials" })
    .int({ error: "Enter a whole number of trials" })
    .min(1, { error: "At least 1 trial" })
    .max(MAX_TRIALS, { error: `At most ${MAX_TRIALS} trials` }),
  seed: z.string().trim().min(1, { error: "A seed is needed so anyone can re-run the study" }).max(200),
});

export type StudyFormInput = z.input<typeof StudyFormSchema>;
export type StudyFormValues = z.output<typeof StudyFormSchema>;

/** Form defaults from the program's error model and study defaults. */
export function studyDefaults(errorModel: ErrorModel, trials: number, seed: string): StudyFormInput {
  return { errorModel: structuredClone(errorModel), trials, seed };
}
