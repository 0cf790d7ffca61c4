import { isRouteErrorResponse, Link, useRouteError } from "react-router";

/** Error boundary for every route: says what went wrong and offers a way back. */
export function RouteError() {
  const error = useRouteError();
  const message = isRouteErrorResponse(error)
    ? `${error.status} ${error.statusText}`
    : error instanceof Error
      ? error.message
      : "Unknown error";
  return (
    <div role="alert" className="mx-auto mt-24 max-w-lg rounded-xl border border-verdict-fail/30 bg-white p-8 shadow-sm">
      <h1 className="text-xl font-semibold text-verdict-fail">This page could not be shown</h1>
      <p className="mt-2 text-ink-700">{message}</p>
      <p className="mt-6 flex gap-4">
        <button type="button" className="rounded-md bg-ink-900 px-4 py-2 text-sm text-paper" onClick={() => window.location.reload()}>
          Reload
        </button>
        <Link to="/" className="rounded-md px-4 py-2 text-sm text-film-teal underline">
          Back to the overview
        </Link>
      </p>
    </div>
  );
}
