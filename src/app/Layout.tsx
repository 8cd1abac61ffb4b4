import { useEffect, useState } from 'react';
import { Navigate, NavLink, Outlet, useLocation } from 'react-router-dom';
import { allows, PAGES } from '@schemas/access';
import { CAUTIONS } from '@schemas/cautions';
import { Spinner } from '@/components/ui';
import { useMe, useSignOut } from '@/features/auth/api';
import { StatusLine } from '@/features/system/StatusLine';

/** The main navigation: the pages of the role map with a label, each shown to those it lets in. */
const NAV = PAGES.flatMap((p) => ('nav' in p ? [{ to: p.path, label: p.nav, access: p.access }] : []));

export function Layout() {
  const me = useMe();
  const location = useLocation();
  const signOut = useSignOut();
  // At phone widths the navigation folds behind a Menu button; it closes when a page is chosen.
  const [menuOpen, setMenuOpen] = useState(false);
  useEffect(() => setMenuOpen(false), [location.pathname]);
  if (me.isPending) {
    return (
      <div className="flex min-h-screen items-center justify-center">
        <Spinner />
      </div>
    );
  }
  if (!me.data) {
    const next = encodeURIComponent(location.pathname + location.search);
    return <Navigate to={`/sign-in?next=${next}`} replace />;
  }
  const user = me.data;
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:bg-paper-card focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-hairline bg-paper">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-8 gap-y-2 px-4 py-3 sm:px-6">
          <NavLink to="/" className="flex items-center gap-2">
            <img src="/favicon.svg" alt="" className="h-7 w-7" />
            <span className="font-heading text-lg font-bold tracking-tight">Tidegauge</span>
          </NavLink>
          <button type="button" className="btn-quiet ml-auto md:hidden" aria-expanded={menuOpen} aria-controls="main-nav" onClick={() => setMenuOpen(!menuOpen)} data-testid="menu-button">
            {menuOpen ? 'Close' : 'Menu'}
          </button>
          <nav
            id="main-nav"
            aria-label="Main"
            className={`${menuOpen ? 'flex' : 'hidden'} order-last w-full flex-col gap-1 md:order-none md:flex md:w-auto md:flex-1 md:flex-row md:flex-wrap`}
          >
            {NAV.filter((item) => allows(item.access, user.roles)).map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                className={({ isActive }) => `rounded px-3 py-1.5 text-sm font-semibold ${isActive ? 'bg-ink text-paper' : 'text-ink-soft hover:bg-paper-deep hover:text-ink'}`}
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className={`${menuOpen ? 'flex' : 'hidden'} order-last w-full items-center justify-between gap-3 border-t border-hairline pt-2 text-sm md:order-none md:ml-0 md:flex md:w-auto md:border-0 md:pt-0`}>
            <NavLink to="/profile" className="text-ink-soft hover:text-ink" data-testid="user-menu">
              {user.name}
            </NavLink>
            <button className="btn-quiet" onClick={() => signOut.mutate()}>
              Sign out
            </button>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto w-full min-w-0 max-w-7xl flex-1 px-4 py-6 sm:px-6 sm:py-8">
        <Outlet />
      </main>
      <footer className="border-t border-hairline">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center justify-between gap-x-4 gap-y-1 px-4 py-2 sm:px-6">
          <StatusLine />
          <span className="text-xs text-ink-faint">{CAUTIONS[2]}</span>
        </div>
      </footer>
    </div>
  );
}
