import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Program } from "./get-program.ts";

export const getPrograms = () => api.get<{ items: Program[] }>("/programs");

export const programsQueryOptions = () =>
  queryOptions({ queryKey: ["programs", "list"], queryFn: getPrograms });

export const usePrograms = () => useQuery(programsQueryOptions());
