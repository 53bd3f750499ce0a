import { useState } from 'react';
import { Navigate, NavLink, Outlet, useLocation, useNavigate } from 'react-router-dom';
import { can, ROLE_LABELS } from '../../../shared/auth/permissions';
import { useMe } from '../../features/auth/api/get-me';
import { ConnectionBar } from '../../features/offline/components/connection-bar';
import { SignOutButton } from '../../features/offline/components/sign-out-button';
import { UpdatePrompt } from '../../features/offline/components/update-prompt';
import { DeviceProvider } from '../../features/offline/device-context';
import { Loading } from '../../components/ui/notice';
import { NAV } from '../nav';
import { paths } from '../paths';

function Wordmark() {
  return (
    <span className="flex items-center gap-2 text-lg font-bold tracking-tight text-white">
      <img src="/rholog-mark.svg" alt="" className="h-7 w-7" />
      Rholog
    </span>
  );
}

/** The signed-in frame: a dark rail on desktop, a top bar with a menu on phones. */
export function AppShell() {
  const { data: user, isPending } = useMe();
  const location = useLocation();
  const navigate = useNavigate();
  const [menuOpen, setMenuOpen] = useState(false);

  if (isPending) return <Loading what="Opening Rholog" />;
  if (!user) return <Navigate to={paths.signIn.to(location.pathname + location.search)} replace />;
  // A temporary password from an administrator is changed before anything else.
  if (user.mustChangePassword && location.pathname !== paths.account.pattern) return <Navigate to={paths.account.to()} replace />;

  const items = NAV.filter((i) => !i.permission || can(user.role, i.permission));

  const links = (
    <ul className="space-y-1" data-testid="main-nav">
      {items.map((item) => (
        <li key={item.to}>
          <NavLink
            to={item.to}
            end={item.to === '/'}
            onClick={() => setMenuOpen(false)}
            className={({ isActive }) =>
              `flex min-h-11 items-center rounded-md px-3 text-sm font-semibold ${isActive ? 'bg-copper text-white' : 'text-white/80 hover:bg-white/10 hover:text-white'}`
            }
          >
            {item.label}
          </NavLink>
        </li>
      ))}
    </ul>
  );

  const who = (
    <div className="border-t border-white/15 pt-3 text-sm text-white/80">
      <NavLink to={paths.account.to()} onClick={() => setMenuOpen(false)} className="block hover:text-white">
        <span className="block font-semibold text-white" data-testid="signed-in-name">
          {user.name}
        </span>
        <span className="block text-xs" data-testid="signed-in-role">
          {ROLE_LABELS[user.role]}
        </span>
      </NavLink>
      <SignOutButton
        onSignedOut={() => navigate(paths.signIn.to())}
        className="mt-2 min-h-11 text-left text-sm font-semibold text-copper-light hover:text-white"
      />
    </div>
  );

  return (
    <DeviceProvider user={user}>
      {/* The first stop of the Tab key: past the navigation to the page itself, seen only when focused. */}
      <a
        href="#page"
        className="no-print sr-only z-30 rounded-md bg-copper px-4 py-2 font-semibold text-white focus:not-sr-only focus:fixed focus:left-2 focus:top-2"
        data-testid="skip-to-page"
      >
        Skip to the page
      </a>
      <div className="min-h-screen lg:flex">
        <aside className="no-print hidden w-60 shrink-0 flex-col gap-6 bg-ink px-4 py-5 lg:flex">
          <Wordmark />
          <nav aria-label="Main" className="flex-1">
            {links}
          </nav>
          {who}
        </aside>
        <header className="no-print sticky top-0 z-20 flex items-center justify-between bg-ink px-4 py-2 lg:hidden">
          <Wordmark />
          <button
            type="button"
            aria-expanded={menuOpen}
            aria-controls="phone-menu"
            onClick={() => setMenuOpen((o) => !o)}
            className="min-h-11 min-w-11 rounded-md px-3 text-sm font-semibold text-white ring-1 ring-white/30"
          >
            {menuOpen ? 'Close' : 'Menu'}
          </button>
        </header>
        {menuOpen && (
          <div
            id="phone-menu"
            className="no-print fixed inset-x-0 top-[60px] z-10 space-y-4 bg-ink px-4 pb-5 pt-2 shadow-lg lg:hidden"
          >
            <nav aria-label="Main">{links}</nav>
            {who}
          </div>
        )}
        <main id="page" tabIndex={-1} className="mx-auto w-full max-w-6xl flex-1 px-4 py-5 outline-none sm:px-6 lg:py-8">
          <UpdatePrompt />
          <ConnectionBar devicePath={paths.device.to()} />
          <Outlet />
        </main>
      </div>
    </DeviceProvider>
  );
}
