// The OpenAPI 3.1 document, generated from the zod schemas of every route declared with route().
import { z } from "zod";
import { API_VERSION } from "../version.ts";
import { routeRegistry, type RegisteredRoute } from "./route.ts";

const ErrorShape = z.object({
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
});

function jsonSchema(schema: z.ZodType, io: "input" | "output"): Record<string, unknown> {
  return z.toJSONSchema(schema, { io, unrepresentable: "any", target: "draft-2020-12" }) as Record<string, unknown>;
}

function parameters(route: RegisteredRoute) {
  const out: Record<string, unknown>[] = [];
  for (const [where, schema] of [
    ["path", route.params],
    ["query", route.query],
  ] as const) {
    if (!schema) continue;
    const js = jsonSchema(schema, "input") as { properties?: Record<string, unknown>; required?: string[] };
    for (const [name, s] of Object.entries(js.properties ?? {})) {
      out.push({ name, in: where, required: where === "path" || (js.required ?? []).includes(name), schema: s });
    }
  }
  return out;
}

function accessText(route: RegisteredRoute): string {
  if (route.access === "public") return "No sign-in needed.";
  if (route.access === "member") return "Any signed-in member of the workspace.";
  return `Roles: ${route.access.join(", ")}.`;
}

export function buildOpenApiDocument(): Record<string, unknown> {
  const paths: Record<string, Record<string, unknown>> = {};
  const routes = [...routeRegistry.values()].sort((a, b) => a.path.localeCompare(b.path));
  for (const r of routes) {
    const oaPath = "/api/v1" + r.path.replace(/:([A-Za-z0-9_]+)/g, "{$1}");
    const responses: Record<string, unknown> = {
      [String(r.status)]: r.response
        ? { description: "Success", content: { "application/json": { schema: jsonSchema(r.response, "output") } } }
        : { description: "Success" },
    };
    const errorStatuses: Record<number, string> = { 400: "Invalid input", ...r.errors };
    if (r.access !== "public") {
      errorStatuses[401] ??= "Not signed in";
      if (r.access !== "member") errorStatuses[403] ??= "Role does not allow this";
    }
    for (const [status, description] of Object.entries(errorStatuses)) {
      responses[status] = { description, content: { "application/json": { schema: jsonSchema(ErrorShape, "output") } } };
    }
    const op: Record<string, unknown> = {
      operationId: `${r.method}${r.path.replace(/[/:{}-]+(\w)?/g, (_m, c: string | undefined) => (c ? c.toUpperCase() : ""))}`,
      summary: r.summary,
      description: accessText(r),
      tags: [r.tag],
      parameters: parameters(r),
      responses,
    };
    if (r.access !== "public") op.security = [{ sessionCookie: [] }];
    if (r.body) {
      const contentType = r.multipart ? "multipart/form-data" : "application/json";
      op.requestBody = { required: true, content: { [contentType]: { schema: jsonSchema(r.body, "input") } } };
    }
    (paths[oaPath] ??= {})[r.method] = op;
  }
  return {
    openapi: "3.1.0",
    info: {
      title: "Stackproof API",
      version: API_VERSION,
      description: "Design review, tolerance yield and release sign-off for multilayer optical coatings.",
    },
    servers: [{ url: "/" }],
    components: {
      securitySchemes: { sessionCookie: { type: "apiKey", in: "cookie", name: "stackproof_session" } },
    },
    paths,
  };
}
