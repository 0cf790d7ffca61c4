import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ReleaseRecordSchema, type Decision, type ReleaseRecord } from "@stackproof/contracts";
import type { BandOutcome, Design } from "@stackproof/optics";

export type { Decision, ReleaseRecord };
export type StackDesign = Design;
export type StackLayer = Design["layers"][number];
export type { BandOutcome };

export const getRelease = (id: string) => api.get(`/releases/${encodeURIComponent(id)}`, { schema: ReleaseRecordSchema });

export const releaseQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["releases", id], queryFn: () => getRelease(id) });

export const useRelease = (id: string) => useQuery(releaseQueryOptions(id));

/** The server's printable HTML of the same record. */
export const releasePrintUrl = (id: string) => `/api/v1/releases/${encodeURIComponent(id)}/print`;
