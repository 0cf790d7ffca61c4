import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Program } from "./types.ts";

export const getProgram = (programId: string) => api.get<Program>(`/programs/${programId}`);

export const programQueryOptions = (programId: string) =>
  queryOptions({ queryKey: ["programs", programId], queryFn: () => getProgram(programId) });

export const useProgram = (programId: string | undefined) =>
  useQuery({ ...programQueryOptions(programId ?? ""), enabled: Boolean(programId) });
