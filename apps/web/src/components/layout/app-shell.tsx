import { NavLink, Outlet } from "react-router";
import { Brand } from "./brand.tsx";
import { HealthBadge } from "../../features/health/components/health-badge.tsx";
import { paths } from "../../config/paths.ts";

const navItems = [{ to: paths.home, label: "Overview" }];

export function AppShell() {
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:m-2 focus:rounded focus:bg-paper focus:p-2">
        Skip to content
      </a>
      <header className="no-print bg-ink-900 text-ink-100">
        <div className="mx-auto flex max-w-screen-2xl items-center gap-6 px-5 py-3">
          <NavLink to={paths.home} aria-label="Stackproof overview">
            <Brand />
          </NavLink>
          <nav aria-label="Main" className="flex gap-1">
            {navItems.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end
                className={({ isActive }) =>
                  `rounded-md px-3 py-1.5 text-sm ${isActive ? "bg-ink-700 text-paper" : "text-ink-300 hover:text-paper"}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <HealthBadge />
            <NavLink to={paths.signIn} className="text-sm text-ink-300 hover:text-paper">
              Sign in
            </NavLink>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-screen-2xl flex-1 px-5 py-6">
        <Outlet />
      </main>
    </div>
  );
}
