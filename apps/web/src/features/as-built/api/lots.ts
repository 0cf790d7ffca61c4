// Measured lots, part fits, calibration: one request shape per export, keys under ["programs", id, ...] and ["lots", id].
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { BuiltFitResult, Calibration, ErrorModel, LotYield, MeasuredSpectrum, PartVerdict } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export interface LotSummary extends LotYield {
  predictedRunId: string | null;
}

export interface LotPart {
  id: string;
  label: string;
  status: "pass" | "fail" | "incomplete";
  verdict: PartVerdict;
  measurements: MeasuredSpectrum[];
  fit: Omit<BuiltFitResult, "design"> | null;
  fittedAt: string | null;
}

export interface Lot {
  id: string;
  programId: string;
  revisionId: string;
  runId: string;
  runDate: string;
  chamber: string;
  notes: string;
  guardK: number;
  createdAt: string;
  summary: LotSummary;
  parts?: LotPart[];
}

export interface SpectraPreview {
  fileName: string;
  delimiter: "," | ";" | "tab";
  decimalComma: boolean;
  detectedScale: "percent" | "fraction";
  reversed: boolean;
  rows: number;
  wavelengthRange: [number, number];
  columns: string[];
}

export interface CalibrationView {
  current: ErrorModel;
  calibration: Calibration | null;
  history: { lotId: string; runId: string; runDate: string; revisionId: string; summary: LotSummary }[];
  adoptWith: string;
}

export const programLotsQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: ["programs", programId, "lots"],
    queryFn: () => api.get<{ items: Lot[] }>(`/programs/${programId}/lots`).then((r) => r.items),
  });
export const useProgramLots = (programId: string) => useQuery(programLotsQueryOptions(programId));

export const lotQueryOptions = (lotId: string) =>
  queryOptions({ queryKey: ["lots", lotId], queryFn: () => api.get<Lot>(`/lots/${lotId}`) });
export const useLot = (lotId: string | null) => useQuery({ ...lotQueryOptions(lotId ?? ""), enabled: lotId !== null });

export const calibrationQueryOptions = (programId: string) =>
  queryOptions({
    queryKey: ["programs", programId, "calibration"],
    queryFn: () => api.get<CalibrationView>(`/programs/${programId}/calibration`),
  });
export const useCalibration = (programId: string) => useQuery(calibrationQueryOptions(programId));

export const usePreviewSpectra = () =>
  useMutation({
    mutationFn: (file: File) => {
      const form = new FormData();
      form.append("file", file);
      return api.post<SpectraPreview>(`/lots/preview`, form);
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
      return api.post<Lot>(`/revisions/${revisionId}/lots`, form);
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: ["programs", programId] }),
  });
}

export function useFitPart(lotId: string, programId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (partId: string) => api.post<LotPart>(`/parts/${partId}/fit`, {}),
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
    mutationFn: (errorModel: ErrorModel) => api.patch(`/programs/${programId}`, { errorModel }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ["programs", programId] }),
  });
}
