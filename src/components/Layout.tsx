import { NavLink, Outlet } from 'react-router-dom';
import { StatusLine } from '@/features/system/StatusLine';

const NAV = [
  { to: '/catalogue', label: 'Catalogue' },
  { to: '/studies', label: 'Studies' },
  { to: '/boards', label: 'Boards' },
  { to: '/review', label: 'Review desk' },
  { to: '/people', label: 'People' },
];

export function Layout() {
  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:bg-paper-card focus:p-2">
        Skip to content
      </a>
      <header className="border-b border-hairline bg-paper">
        <div className="mx-auto flex max-w-7xl items-center gap-8 px-6 py-3">
          <NavLink to="/" className="flex items-center gap-2">
            <img src="/favicon.svg" alt="" className="h-7 w-7" />
            <span className="font-heading text-lg font-bold tracking-tight">Tidegauge</span>
          </NavLink>
          <nav aria-label="Main" className="flex gap-1">
            {NAV.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                className={({ isActive }) =>
                  `rounded px-3 py-1.5 text-sm font-semibold ${isActive ? 'bg-ink text-paper' : 'text-ink-soft hover:bg-paper-deep hover:text-ink'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
        </div>
      </header>
      <main id="main" className="mx-auto w-full max-w-7xl flex-1 px-6 py-8">
        <Outlet />
      </main>
      <footer className="border-t border-hairline">
        <div className="mx-auto flex max-w-7xl items-center justify-between px-6 py-2">
          <StatusLine />
          <span className="text-xs text-ink-faint">Estimates are inputs to judgement.</span>
        </div>
      </footer>
    </div>
  );
}
