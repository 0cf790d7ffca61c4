import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ProgramDetailSchema, type OverviewRow, type Program, type ProgramDetail } from "@stackproof/contracts";

/** A design of the program, summarised like an overview row. */
export type ProgramDesignRow = OverviewRow;
export type { Program, ProgramDetail };

export const getProgram = (id: string) => api.get(`/programs/${encodeURIComponent(id)}`, { schema: ProgramDetailSchema });

export const programQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["programs", id], queryFn: () => getProgram(id) });

export const useProgram = (id: string) => useQuery(programQueryOptions(id));
