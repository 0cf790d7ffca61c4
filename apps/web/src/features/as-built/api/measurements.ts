import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export interface MeasuredSpectrum {
  id: string;
  label: string;
  quantity: "R" | "T";
  angleDeg: number;
  polarization: "s" | "p" | "u";
  wavelengths: number[];
  /** percent */
  values: number[];
  createdAt: string;
}

export const measurementsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "measurements"],
    queryFn: () => api.get<{ items: MeasuredSpectrum[] }>(`/revisions/${revisionId}/measurements`).then((r) => r.items),
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
      return api.post<MeasuredSpectrum>(`/revisions/${revisionId}/measurements`, form);
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["revisions", revisionId, "measurements"] }),
  });
}
