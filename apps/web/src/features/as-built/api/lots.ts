// Measured lots, part fits, calibration: one request shape per export, keys under ["programs", id, ...] and ["lots", id].
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { ErrorModel } from "@stackproof/optics";
import {
  CalibrationResponse,
  LotListResponse,
  LotPartSchema,
  LotSchema,
  ProgramSchema,
  SpectraPreviewSchema,
  type CalibrationView,
  type Lot,
  type LotPart,
  type LotSummary,
  type SpectraPreview,
} from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { CalibrationView, Lot, LotPart, LotSummary, SpectraPreview };

export const programLotsQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: ["programs", programId, "lots"],
    queryFn: () => api.get(`/programs/${programId}/lots`, { schema: LotListResponse }).then((r) => r.items),
  });
export const useProgramLots = (programId: string) => useQuery(programLotsQueryOptions(programId));

export const lotQueryOptions = (lotId: string) =>
  queryOptions({
    queryKey: ["lots", lotId],
    queryFn: () => api.get(`/lots/${lotId}`, { schema: LotSchema }),
  });
export const useLot = (lotId: string | null) =>
  useQuery({ ...lotQueryOptions(lotId ?? ""), enabled: lotId !== null });

export const calibrationQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: ["programs", programId, "calibration"],
    queryFn: () => api.get(`/programs/${programId}/calibration`, { schema: CalibrationResponse }),
  });
export const useCalibration = (programId: string) => useQuery(calibrationQueryOptions(programId));

export const usePreviewSpectra = () =>
  useMutation({
    mutationFn: (file: File) => {
      const form = new FormData();
      form.append("file", file);
      return api.post(`/lots/preview`, form, { schema: SpectraPreviewSchema });
    },
  });

export interface LotUpload {
  file: File;
  scale: "percent" | "fraction";
  quantity: "R" | "T";
  angleDeg: number;
  polarization: "s" | "p" | "u";
  uncertaintyPct: number;
  runId: string;
  runDate: string;
  chamber: string;
}

export function useUploadLot(revisionId: string, programId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: LotUpload) => {
      const form = new FormData();
      form.append("file", u.file);
      for (const [k, v] of Object.entries(u)) if (k !== "file") form.append(k, String(v));
      return api.post(`/revisions/${revisionId}/lots`, form, { schema: LotSchema });
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["programs", programId] }),
  });
}

export function useFitPart(lotId: string, programId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (partId: string) => api.post(`/parts/${partId}/fit`, {}, { schema: LotPartSchema }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: ["lots", lotId] });
      void qc.invalidateQueries({ queryKey: ["programs", programId, "calibration"] });
    },
  });
}

/** Adopt a proposed error model: the program-update route (approver, admin); evidence must then be re-run. */
export function useAdoptErrorModel(programId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (errorModel: ErrorModel) =>
      api.patch(`/programs/${programId}`, { errorModel }, { schema: ProgramSchema }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ["programs", programId] }),
  });
}
