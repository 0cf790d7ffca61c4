import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ProgramListResponse } from "@stackproof/contracts";

export const getPrograms = () => api.get("/programs", { schema: ProgramListResponse });

export const programsQueryOptions = () =>
  queryOptions({ queryKey: ["programs", "list"], queryFn: getPrograms });

export const usePrograms = () => useQuery(programsQueryOptions());
