import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { MeasurementListResponse, MeasurementOutSchema, type MeasuredSpectrum } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { MeasuredSpectrum };

export const measurementsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "measurements"],
    queryFn: () =>
      api
        .get(`/revisions/${revisionId}/measurements`, { schema: MeasurementListResponse })
        .then((r) => r.items),
  });

export const useMeasurements = (revisionId: string) => useQuery(measurementsQueryOptions(revisionId));

export function useUploadMeasurement(revisionId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: {
      file: File;
      label: string;
      angleDeg: number;
      polarization: "s" | "p" | "u";
      /** how the values are written, as the user confirmed it */
      scale: "percent" | "fraction";
      /** omitted: the column header says R or T */
      quantity?: "R" | "T";
    }) => {
      const form = new FormData();
      form.append("file", input.file);
      form.append("label", input.label);
      form.append("angleDeg", String(input.angleDeg));
      form.append("polarization", input.polarization);
      form.append("scale", input.scale);
      if (input.quantity) form.append("quantity", input.quantity);
      return api.post(`/revisions/${revisionId}/measurements`, form, { schema: MeasurementOutSchema });
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["revisions", revisionId, "measurements"] }),
  });
}
