import type { ReactNode } from "react";
import { Brand } from "./brand.tsx";

export interface AuthLayoutProps {
  title: ReactNode;
  intro?: ReactNode;
  children: ReactNode;
  /** Links under the card (e.g. "Back to sign-in"). */
  footer?: ReactNode;
}

/** The frame of the pages before sign-in: an ink band with the stack motif beside a paper form. */
export function AuthLayout({ title, intro, children, footer }: AuthLayoutProps) {
  return (
    <div className="grid min-h-screen md:grid-cols-[minmax(0,5fr)_minmax(0,7fr)]">
      <title>{`${typeof title === "string" ? title : "Sign in"} · Stackproof`}</title>
      <div className="relative hidden overflow-hidden bg-ink-900 px-10 py-12 text-ink-100 md:flex md:flex-col">
        <Brand />
        <div className="mt-auto max-w-sm">
          <p className="text-2xl leading-snug font-semibold text-paper">
            Prove the stack before it meets the chamber.
          </p>
          <p className="mt-3 text-sm text-ink-300">
            Spec masks, yield under real process errors, review threads and release records for every coating
            your team signs off.
          </p>
        </div>
        {/* The interference motif: alternating high/low layers, fading upwards. */}
        <div
          aria-hidden
          className="pointer-events-none absolute -top-6 -right-16 flex w-72 rotate-[-8deg] flex-col gap-2 opacity-70"
        >
          {Array.from({ length: 11 }, (_, i) => (
            <span
              key={i}
              className={i % 2 ? "h-3 rounded-sm bg-film-teal-soft" : "h-5 rounded-sm bg-film-amber-soft"}
              style={{ opacity: 0.15 + (i / 11) * 0.6 }}
            />
          ))}
        </div>
      </div>
      <main className="flex flex-col items-center justify-center px-5 py-10">
        <div className="mb-8 rounded-lg bg-ink-900 px-3 py-2 md:hidden">
          <Brand />
        </div>
        <div className="w-full max-w-sm">
          <h1 className="text-2xl font-semibold tracking-tight text-ink-900">{title}</h1>
          {intro && <div className="mt-2 text-sm text-ink-700">{intro}</div>}
          <div className="mt-6">{children}</div>
          {footer && <div className="mt-6 flex flex-wrap gap-x-4 gap-y-1 text-sm">{footer}</div>}
        </div>
      </main>
    </div>
  );
}
