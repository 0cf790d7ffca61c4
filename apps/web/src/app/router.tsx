import { createBrowserRouter, RouterProvider } from "react-router";
import { AppShell } from "../components/layout/app-shell.tsx";
import { RouteError } from "./routes/route-error.tsx";

export function createRouter() {
  return createBrowserRouter([
    {
      element: <AppShell />,
      errorElement: <RouteError />,
      children: [
        { index: true, lazy: () => import("./routes/home.tsx") },
        { path: "sign-in", lazy: () => import("./routes/sign-in.tsx") },
        { path: "*", lazy: () => import("./routes/not-found.tsx") },
      ],
    },
  ]);
}

const router = createRouter();

export function AppRouter() {
  return <RouterProvider router={router} />;
}
