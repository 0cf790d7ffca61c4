import { createBrowserRouter, RouterProvider } from "react-router";
import { AppShell } from "./app-shell.tsx";
import { RouteError } from "./routes/route-error.tsx";
import { requireSession } from "../lib/session.ts";
import { PageSpinner } from "../components/ui/spinner.tsx";
import { queryClient } from "../lib/query-client.ts";
import { outboxAvailableQueryOptions } from "../features/outbox/api/get-outbox.ts";

export function createRouter() {
  return createBrowserRouter([
    // Pages outside the shell: signing in, and the printable release record.
    { path: "sign-in", lazy: () => import("./routes/auth/sign-in.tsx"), errorElement: <RouteError /> },
    {
      path: "forgot-password",
      lazy: () => import("./routes/auth/forgot-password.tsx"),
      errorElement: <RouteError />,
    },
    {
      path: "reset-password",
      lazy: () => import("./routes/auth/reset-password.tsx"),
      errorElement: <RouteError />,
    },
    {
      path: "accept-invitation",
      lazy: () => import("./routes/auth/accept-invitation.tsx"),
      errorElement: <RouteError />,
    },
    {
      path: "releases/:releaseId",
      lazy: () => import("./routes/release-record.tsx"),
      errorElement: <RouteError />,
    },
    {
      id: "shell",
      element: <AppShell />,
      errorElement: <RouteError />,
      hydrateFallbackElement: <PageSpinner label="Opening Stackproof…" />,
      // Signed-out people are sent to /sign-in?next=<where they were going>.
      // The outbox check runs alongside, so the navigation does not grow a link after the page has shown.
      loader: async ({ request }) => {
        const [session] = await Promise.all([
          requireSession(request),
          queryClient.ensureQueryData(outboxAvailableQueryOptions()),
        ]);
        return session;
      },
      children: [
        {
          // Errors of a page show inside the shell, so the navigation stays.
          errorElement: <RouteError />,
          children: [
            { index: true, lazy: () => import("./routes/home.tsx") },
            { path: "programs/new", lazy: () => import("./routes/program-edit.tsx") },
            { path: "programs/:programId", lazy: () => import("./routes/program.tsx") },
            { path: "programs/:programId/edit", lazy: () => import("./routes/program-edit.tsx") },
            { path: "materials", lazy: () => import("./routes/materials.tsx") },
            { path: "people", lazy: () => import("./routes/people.tsx") },
            { path: "audit", lazy: () => import("./routes/audit.tsx") },
            { path: "outbox", lazy: () => import("./routes/outbox.tsx") },
            // The design workspace.
            { path: "designs/new", lazy: () => import("./routes/designs/new-design.tsx") },
            { path: "designs/:designId", lazy: () => import("./routes/designs/design.tsx") },
            {
              path: "designs/:designId/revisions/:revisionId",
              lazy: () => import("./routes/designs/revision.tsx"),
            },
            { path: "designs/:designId/compare", lazy: () => import("./routes/designs/compare.tsx") },
            { path: "*", lazy: () => import("./routes/not-found.tsx") },
          ],
        },
      ],
    },
  ]);
}

const router = createRouter();

export function AppRouter() {
  return <RouterProvider router={router} />;
}
