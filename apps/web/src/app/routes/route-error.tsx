import { isRouteErrorResponse, Link, useRouteError } from "react-router";
import { ApiError } from "../../lib/api-client.ts";

function describe(error: unknown): { title: string; message: string } {
  if (isRouteErrorResponse(error)) {
    const detail = typeof error.data === "string" && error.data ? error.data : "";
    if (error.status === 403)
      return {
        title: error.statusText || "Not allowed",
        message: detail || "Your roles do not allow this page.",
      };
    if (error.status === 404)
      return { title: "Not found", message: detail || "There is nothing at this address." };
    return {
      title: "This page could not be shown",
      message: `${error.status} ${error.statusText}${detail ? ` — ${detail}` : ""}`,
    };
  }
  if (error instanceof ApiError) return { title: "This page could not be shown", message: error.message };
  if (error instanceof Error) return { title: "This page could not be shown", message: error.message };
  return { title: "This page could not be shown", message: "Unknown error" };
}

/** Error boundary for every route: says what went wrong and offers a way back. */
export function RouteError() {
  const error = useRouteError();
  const { title, message } = describe(error);
  return (
    <div
      role="alert"
      className="mx-auto mt-16 max-w-lg rounded-xl border border-verdict-fail/30 bg-white p-8 shadow-sm"
    >
      <h1 className="text-xl font-semibold text-verdict-fail">{title}</h1>
      <p className="mt-2 text-ink-700">{message}</p>
      <p className="mt-6 flex gap-4">
        <button
          type="button"
          className="rounded-md bg-ink-900 px-4 py-2 text-sm text-paper"
          onClick={() => window.location.reload()}
        >
          Reload
        </button>
        <Link to="/" className="rounded-md px-4 py-2 text-sm text-film-teal underline">
          Back to the overview
        </Link>
      </p>
    </div>
  );
}
