/**
 * The frame around every page: brand, main navigation, account menu. Under 768 px (Tailwind's
 * `md`) the navigation folds behind a menu button (aria-expanded; Escape closes it and returns
 * focus to the button; a new page closes it).
 */
import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { Form, Link, NavLink, useLocation } from "react-router";
import { Wordmark } from "./Logo";

export interface ShellUser {
  id: number;
  name: string;
  email: string;
  role: string;
  /** May manage users (decided by the policy module in the root loader). */
  admin?: boolean;
  /** Show the development mailbox link (only when the local mail catcher runs). */
  mailbox?: boolean;
  /** Proposals waiting for review, for users the policy lets review (undefined for others: no link). */
  reviewQueue?: number;
}

const NAV = [
  { to: "/library", label: "Library" },
  { to: "/mechanisms", label: "Mechanisms" },
  { to: "/runs", label: "Runs" },
  { to: "/data", label: "Data" },
  { to: "/analysis", label: "Activation analysis" },
];

function navClass({ isActive }: { isActive: boolean }) {
  return [
    "rounded-md px-3 py-1.5 text-sm font-medium transition-colors",
    isActive ? "bg-ink-700 text-white" : "text-ink-200 hover:bg-ink-800 hover:text-white",
  ].join(" ");
}

export function AppShell({ user, csrf, children }: { user: ShellUser | null; csrf?: string; children: ReactNode }) {
  // The account menu closes when the page changes (a new key remounts the <details>).
  const { pathname } = useLocation();
  const [navOpen, setNavOpen] = useState(false);
  const menuButton = useRef<HTMLButtonElement>(null);
  const navId = useId();
  useEffect(() => setNavOpen(false), [pathname]);
  return (
    <div className="flex min-h-screen flex-col">
      <header className="bg-ink-900 text-white">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2.5">
          <Link to="/" aria-label="Saddlebook home">
            <Wordmark />
          </Link>
          <button
            ref={menuButton}
            type="button"
            className="rounded-md px-3 py-1.5 text-sm font-medium text-ink-100 hover:bg-ink-800 md:hidden"
            aria-expanded={navOpen}
            aria-controls={navId}
            onClick={() => setNavOpen((o) => !o)}
          >
            <span aria-hidden="true">☰</span> Menu
          </button>
          <nav
            id={navId}
            aria-label="Main"
            className={`${navOpen ? "flex" : "hidden"} order-last w-full flex-col items-stretch gap-1 md:order-none md:flex md:w-auto md:flex-row md:flex-wrap md:items-center`}
            onKeyDown={(e) => {
              if (e.key === "Escape" && navOpen) {
                setNavOpen(false);
                menuButton.current?.focus();
              }
            }}
          >
            {NAV.map((n) => (
              <NavLink key={n.to} to={n.to} className={navClass}>
                {n.label}
              </NavLink>
            ))}
            {user?.reviewQueue !== undefined && (
              <NavLink to="/library/review" end className={navClass} aria-label={`Review queue, ${user.reviewQueue} waiting`}>
                Review queue{" "}
                <span className="ml-1 rounded-full bg-copper-700 px-1.5 text-xs text-white" data-testid="review-count">
                  {user.reviewQueue}
                </span>
              </NavLink>
            )}
          </nav>
          <div className="ml-auto">
            {user ? (
              <details className="relative" key={pathname}>
                <summary className="cursor-pointer list-none rounded-md px-3 py-1.5 text-sm text-ink-100 hover:bg-ink-800">
                  {user.name} <span className="text-ink-300">· {user.role}</span>
                </summary>
                <div className="absolute right-0 z-50 mt-1 w-52 rounded-md border border-ink-200 bg-white py-1 text-sm text-ink-900 shadow-lg">
                  <p className="border-b border-ink-100 px-3 pt-1 pb-2 text-xs text-ink-500">{user.email}</p>
                  <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/settings">
                    Settings
                  </Link>
                  <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/settings/tokens">
                    API tokens
                  </Link>
                  <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/api/v1/docs">
                    API reference
                  </Link>
                  <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/groups">
                    Groups
                  </Link>
                  {user.admin && (
                    <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/admin/users">
                      Users (admin)
                    </Link>
                  )}
                  {user.mailbox && (
                    <Link className="block px-3 py-1.5 hover:bg-ink-50" to="/dev/mailbox">
                      Mailbox (development)
                    </Link>
                  )}
                  <Form method="post" action="/sign-out">
                    {csrf && <input type="hidden" name="csrf" value={csrf} />}
                    <button className="block w-full px-3 py-1.5 text-left hover:bg-ink-50" type="submit">
                      Sign out
                    </button>
                  </Form>
                </div>
              </details>
            ) : (
              <Link to="/sign-in" className="btn-primary">
                Sign in
              </Link>
            )}
          </div>
        </div>
      </header>
      <main className="mx-auto w-full max-w-7xl flex-1 px-4 py-6">{children}</main>
      <footer className="border-t border-ink-200 py-3 text-center text-xs text-ink-500">
        Saddlebook · model predictions are estimates; check them against measurement.
      </footer>
    </div>
  );
}
