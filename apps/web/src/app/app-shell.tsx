import { Navigate, NavLink, Outlet, useLocation, useNavigate, useNavigation } from "react-router";
import { Brand } from "../components/layout/brand.tsx";
import { navItemsFor } from "../components/layout/nav-items.ts";
import { HealthBadge } from "../features/health/components/health-badge.tsx";
import { useOutboxAvailable } from "../features/outbox/api/get-outbox.ts";
import { useSignOut } from "../features/auth/api/sign-out.ts";
import { paths } from "../config/paths.ts";
import { roleLabel, signInPath, useSession } from "../lib/session.ts";
import { Badge } from "../components/ui/badge.tsx";
import { cx } from "../components/ui/cx.ts";

/** The frame of every signed-in page: brand, navigation for the person's roles, who is signed in, sign-out. */
export function AppShell() {
  const session = useSession();
  const location = useLocation();
  const navigate = useNavigate();
  const navigation = useNavigation();
  const outboxAvailable = useOutboxAvailable();
  const signOut = useSignOut();

  // The loader already redirects; this catches a session that ended while the page was open (a 401 later on).
  if (!session) return <Navigate to={signInPath(location.pathname + location.search)} replace />;

  const items = navItemsFor(session, outboxAvailable);
  const initials = session.user.name
    .split(/\s+/)
    .map((w) => w[0] ?? "")
    .join("")
    .slice(0, 2)
    .toUpperCase();

  return (
    <div className="flex min-h-screen flex-col">
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:z-50 focus:m-2 focus:rounded focus:bg-paper focus:p-2"
      >
        Skip to content
      </a>
      <header className="no-print bg-ink-900 text-ink-100">
        <div className="mx-auto flex max-w-screen-2xl flex-wrap items-center gap-x-6 gap-y-2 px-5 py-2.5">
          <NavLink to={paths.home} aria-label="Stackproof overview" className="py-1">
            <Brand />
          </NavLink>
          <nav
            aria-label="Main"
            className="order-3 flex w-full gap-1 overflow-x-auto lg:order-none lg:w-auto"
          >
            {items.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end={item.end}
                className={({ isActive }) =>
                  cx(
                    "rounded-md px-3 py-1.5 text-sm whitespace-nowrap",
                    isActive
                      ? "bg-ink-700 text-paper shadow-[inset_0_-2px_0_var(--color-film-amber-soft)]"
                      : "text-ink-300 hover:text-paper",
                  )
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <HealthBadge />
            <div className="flex items-center gap-2.5 border-l border-ink-700 pl-3">
              <span
                aria-hidden
                className="flex h-8 w-8 items-center justify-center rounded-full bg-film-teal text-xs font-semibold text-paper"
              >
                {initials}
              </span>
              <div className="hidden leading-tight sm:block" data-testid="signed-in-as">
                <p className="text-sm text-paper">
                  <span className="sr-only">Signed in as </span>
                  {session.user.name}
                </p>
                <p className="text-[11px] text-ink-300">{session.workspace.name}</p>
              </div>
              <ul aria-label="Your roles" className="hidden gap-1 md:flex">
                {session.roles.map((r) => (
                  <li key={r}>
                    <Badge tone="ink" className="border-ink-700 bg-ink-800 text-ink-100">
                      {roleLabel[r]}
                    </Badge>
                  </li>
                ))}
              </ul>
              <button
                type="button"
                onClick={() =>
                  signOut.mutate(undefined, { onSettled: () => navigate(paths.signIn, { replace: true }) })
                }
                disabled={signOut.isPending}
                className="rounded-md px-2.5 py-1.5 text-sm text-ink-300 hover:bg-ink-800 hover:text-paper"
              >
                {signOut.isPending ? "Signing out…" : "Sign out"}
              </button>
            </div>
          </div>
        </div>
        <div
          aria-hidden
          className={cx(
            "h-0.5 bg-gradient-to-r from-film-amber-soft via-film-teal-soft to-film-violet transition-opacity",
            navigation.state === "loading" ? "animate-pulse opacity-100" : "opacity-0",
          )}
        />
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-screen-2xl flex-1 px-5 py-6 outline-none">
        <Outlet />
      </main>
    </div>
  );
}
