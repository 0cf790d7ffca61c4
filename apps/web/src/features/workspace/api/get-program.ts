import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ProgramDetailSchema } from "@stackproof/contracts";

export const getProgram = (programId: string) => api.get(`/programs/${programId}`, { schema: ProgramDetailSchema });

export const programQueryOptions = (programId: string) =>
  queryOptions({ queryKey: ["programs", programId], queryFn: () => getProgram(programId) });

export const useProgram = (programId: string | undefined) =>
  useQuery({ ...programQueryOptions(programId ?? ""), enabled: Boolean(programId) });
