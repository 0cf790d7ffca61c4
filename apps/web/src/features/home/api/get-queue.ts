import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { QueueResponse, type Queue } from "@stackproof/contracts";

export type { Queue };

export const getQueue = () => api.get("/queue", { schema: QueueResponse });

export const queueQueryOptions = () => queryOptions({ queryKey: ["queue"], queryFn: getQueue });

export const useQueue = () => useQuery(queueQueryOptions());
