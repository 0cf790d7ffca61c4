// The one fetch-based client for the Stackproof API. Errors arrive as { error: { code, message, details } }.
// A request that expects a body passes its contract schema (@stackproof/contracts); the answer is parsed with it,
// so the web app's types are the schemas' (z.infer) and a server that drifts from its contract fails loudly here.
import type { z } from "zod";

export interface ApiErrorBody {
  code: string;
  message: string;
  details?: unknown;
}

export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
    /** Seconds from a Retry-After header (429), when the server sent one. */
    readonly retryAfter?: number,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

type Query = Record<string, string | number | boolean | undefined>;

export interface RequestOptions<S extends z.ZodType | undefined = undefined> {
  query?: Query;
  body?: unknown;
  signal?: AbortSignal;
  /** Contract schema of the success body; without one the body is ignored (204 and "no body of interest"). */
  schema?: S;
}

/** What a request resolves to: the schema's output, or nothing when no schema was given. */
export type Answer<S> = S extends z.ZodType ? z.output<S> : void;

function buildUrl(path: string, query?: Query): string {
  const url = path.startsWith("/api") ? path : `/api/v1${path}`;
  if (!query) return url;
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(query)) if (v !== undefined) params.set(k, String(v));
  const s = params.toString();
  return s ? `${url}?${s}` : url;
}

async function request<S extends z.ZodType | undefined>(
  method: string,
  path: string,
  options: RequestOptions<S> = {},
): Promise<Answer<S>> {
  const isForm = options.body instanceof FormData;
  let res: Response;
  try {
    res = await fetch(buildUrl(path, options.query), {
      method,
      credentials: "same-origin",
      signal: options.signal,
      headers: options.body === undefined || isForm ? undefined : { "Content-Type": "application/json" },
      body:
        options.body === undefined
          ? undefined
          : isForm
            ? (options.body as FormData)
            : JSON.stringify(options.body),
    });
  } catch (error) {
    if (error instanceof DOMException && error.name === "AbortError") throw error;
    throw new ApiError(
      0,
      "network_error",
      "The Stackproof server could not be reached. Check your connection and try again.",
    );
  }
  const text = await res.text();
  const data: unknown = text ? safeJson(text) : undefined;
  if (!res.ok) {
    const err = (data as { error?: ApiErrorBody } | undefined)?.error;
    const retry = Number(res.headers.get("Retry-After"));
    throw new ApiError(
      res.status,
      err?.code ?? "http_error",
      err?.message ?? `Request failed (${res.status}).`,
      err?.details,
      Number.isFinite(retry) && retry > 0 ? retry : undefined,
    );
  }
  if (!options.schema) return undefined as Answer<S>;
  const parsed = options.schema.safeParse(data);
  if (!parsed.success) {
    throw new ApiError(
      res.status,
      "unexpected_response",
      `The server's answer to ${method} ${path} did not have the expected shape. Reload the page; if it persists, the server and this page are different versions.`,
      parsed.error.issues,
    );
  }
  return parsed.data as Answer<S>;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
}

type Options<S extends z.ZodType | undefined> = Omit<RequestOptions<S>, "body">;

export const api = {
  get: <S extends z.ZodType | undefined = undefined>(path: string, options?: Options<S>) =>
    request<S>("GET", path, options),
  post: <S extends z.ZodType | undefined = undefined>(path: string, body?: unknown, options?: Options<S>) =>
    request<S>("POST", path, { ...options, body }),
  patch: <S extends z.ZodType | undefined = undefined>(path: string, body?: unknown, options?: Options<S>) =>
    request<S>("PATCH", path, { ...options, body }),
  put: <S extends z.ZodType | undefined = undefined>(path: string, body?: unknown, options?: Options<S>) =>
    request<S>("PUT", path, { ...options, body }),
  delete: <S extends z.ZodType | undefined = undefined>(path: string, options?: Options<S>) =>
    request<S>("DELETE", path, options),
};
