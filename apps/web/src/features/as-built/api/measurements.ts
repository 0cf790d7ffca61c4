import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { MeasurementListResponse, MeasurementOutSchema, type MeasuredSpectrum } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { MeasuredSpectrum };

export const measurementsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "measurements"],
    queryFn: () => api.get(`/revisions/${revisionId}/measurements`, { schema: MeasurementListResponse }).then((r) => r.items),
  });

export const useMeasurements = (revisionId: string) => useQuery(measurementsQueryOptions(revisionId));

export function useUploadMeasurement(revisionId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: { file: File; label: string; angleDeg: number; polarization: "s" | "p" | "u" }) => {
      const form = new FormData();
      form.append("file", input.file);
      form.append("label", input.label);
      form.append("angleDeg", String(input.angleDeg));
      form.append("polarization", input.polarization);
      return api.post(`/revisions/${revisionId}/measurements`, form, { schema: MeasurementOutSchema });
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["revisions", revisionId, "measurements"] }),
  });
}
