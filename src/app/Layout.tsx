import { useEffect, useState } from "react";
import { NavLink, Outlet, useNavigate } from "react-router-dom";
import { useQueryClient } from "@tanstack/react-query";
import { Suspense } from "react";
import { useSession, sessionKeys } from "../lib/session.ts";
import { api } from "../lib/api.ts";
import { connectSocket, disconnectSocket, isSocketConnected, onConnectionChange } from "../lib/socket.ts";
import { visibleNav } from "./nav.ts";
import { PageLoading } from "../components/Spinner.tsx";
import { Logo } from "../components/Logo.tsx";

export function Layout() {
  const { me } = useSession();
  const qc = useQueryClient();
  const navigate = useNavigate();
  const [menuOpen, setMenuOpen] = useState(false);
  const live = useLive();

  useEffect(() => {
    if (!me) return;
    connectSocket(qc);
    return () => disconnectSocket();
  }, [me?.user.id, qc]); // eslint-disable-line react-hooks/exhaustive-deps

  const items = visibleNav(me?.permissions ?? []);

  const signOut = async () => {
    await api("/auth/logout", { method: "POST" }).catch(() => undefined);
    disconnectSocket();
    qc.clear();
    qc.setQueryData(sessionKeys.me(), null);
    navigate("/sign-in", { replace: true });
  };

  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-surface focus:px-3 focus:py-2">
        Skip to content
      </a>
      {/* Sticky on screen; static in print. Full-page captures are taken from the top (tests/browser/harness.ts),
          where the sticky header sits in its own place above the content. */}
      <header className="sticky top-0 z-30 border-b border-line bg-surface/95 backdrop-blur print:static print:backdrop-blur-none">
        <div className="mx-auto flex h-13 max-w-[1600px] items-center gap-4 px-4 sm:px-6">
          <NavLink to="/" className="flex shrink-0 items-center gap-2 text-ink no-underline" aria-label="Barhound start page">
            <Logo className="size-7" />
            <span className="text-lead font-semibold tracking-tight">Barhound</span>
          </NavLink>
          <button
            type="button"
            className="ml-auto rounded-md border border-line px-2.5 py-1 text-caption md:hidden"
            aria-expanded={menuOpen}
            aria-controls="main-nav"
            onClick={() => setMenuOpen((o) => !o)}
          >
            Menu
          </button>
          <nav
            id="main-nav"
            aria-label="Main"
            className={`${menuOpen ? "flex" : "hidden"} absolute inset-x-0 top-13 flex-col border-b border-line bg-surface px-4 py-2 md:static md:flex md:flex-row md:items-stretch md:gap-1 md:border-0 md:p-0`}
          >
            {items.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                onClick={() => setMenuOpen(false)}
                className={({ isActive }) =>
                  `relative flex items-center rounded-md px-2.5 py-1.5 font-medium no-underline md:rounded-none md:py-0 md:h-13 ${
                    isActive ? "text-brand-strong md:after:absolute md:after:inset-x-2 md:after:bottom-0 md:after:h-0.5 md:after:bg-brand bg-brand-soft md:bg-transparent" : "text-ink-muted hover:text-ink"
                  }`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto hidden items-center gap-3 md:flex">
            <span className="flex items-center gap-1.5 text-caption text-ink-muted" title={live ? "Live updates connected" : "Live updates not connected; pages refresh when opened"}>
              <span aria-hidden="true" className={`size-2 rounded-full ${live ? "bg-ok" : "bg-line-strong"}`} />
              {live ? "Live" : "Offline"}
            </span>
            {me && (
              <span className="text-right leading-tight">
                <span className="block font-medium" data-testid="user-name">{me.user.name}</span>
                <span className="block text-caption capitalize text-ink-muted" data-testid="user-role">{me.user.role}</span>
              </span>
            )}
            <button type="button" onClick={signOut} className="rounded-md border border-line-strong px-2.5 py-1 text-caption font-medium hover:bg-sunken">
              Sign out
            </button>
          </div>
        </div>
        {menuOpen && (
          <div className="flex items-center justify-between border-t border-line px-4 py-2 md:hidden">
            <span className="text-caption text-ink-muted">{me?.user.name} · {me?.user.role}</span>
            <button type="button" onClick={signOut} className="rounded-md border border-line-strong px-2.5 py-1 text-caption">
              Sign out
            </button>
          </div>
        )}
      </header>
      <main id="main" className="flex-1">
        <Suspense fallback={<PageLoading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}

/** Whether live updates arrive, for the header: follows the socket's connect and disconnect. */
function useLive() {
  const [live, setLive] = useState(isSocketConnected);
  useEffect(() => {
    setLive(isSocketConnected());
    return onConnectionChange(setLive);
  }, []);
  return live;
}
