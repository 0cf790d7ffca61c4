import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { OverviewResponse, type OverviewRow as OverviewRowOut } from "@stackproof/contracts";

/** A row of the home table: a design with its latest revision (every design is created with revision 1). */
export type OverviewRow = OverviewRowOut & { latestRevision: NonNullable<OverviewRowOut["latestRevision"]> };

const hasRevision = (r: OverviewRowOut): r is OverviewRow => r.latestRevision !== null;

export const getOverview = () =>
  api.get("/overview", { schema: OverviewResponse }).then((r) => ({ items: r.items.filter(hasRevision) }));

export const overviewQueryOptions = () => queryOptions({ queryKey: ["overview"], queryFn: getOverview });

export const useOverview = () => useQuery(overviewQueryOptions());
