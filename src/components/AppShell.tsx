import { NavLink, Navigate, Outlet, useLocation, useNavigate } from 'react-router';
import { Suspense, useState } from 'react';
import { ROLE_LABELS } from '../../shared/roles';
import { useLogout, useSession } from '../features/auth/api';
import { navFor, paths } from '../lib/navigation';
import { usePublicSettings } from '../lib/format';
import { Logo } from './Logo';
import { ShopIdentity } from './ShopIdentity';
import { ErrorState, Loading } from './ui/states';

/** The signed-in frame: the role's navigation beside the page. */
export function AppShell() {
  const session = useSession();
  const logout = useLogout();
  const navigate = useNavigate();
  const location = useLocation();
  const shopName = usePublicSettings().data?.shopName;
  const [menuOpen, setMenuOpen] = useState(false);
  if (session.isPending) return <Loading label="Checking your session…" />;
  if (session.isError) return <div className="p-6"><ErrorState error={session.error} retry={() => session.refetch()} /></div>;
  const user = session.data;
  if (!user) return <Navigate to={paths.signIn} replace state={{ from: location.pathname }} />;

  const signOut = () => logout.mutate(undefined, { onSuccess: () => navigate(paths.signIn) });
  return (
    <div className="min-h-screen desk:grid desk:grid-cols-[15rem_1fr]">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50 focus:bg-white focus:p-2">
        Skip to content
      </a>
      <aside className="sticky top-0 z-40 bg-spruce-900 text-spruce-100 desk:static desk:min-h-screen">
        <div className="flex items-center gap-3 px-4 py-2 desk:py-4">
          {user.role === 'customer' ? (
            <span className="mr-auto text-white"><ShopIdentity /></span>
          ) : (
            <>
              <Logo />
              <div className="mr-auto">
                <p className="text-xl font-bold tracking-tight text-white">Kneepoint</p>
                <p className="hidden text-xs text-spruce-200 desk:block">{shopName ? `Production at ${shopName}` : 'Workshop production'}</p>
              </div>
            </>
          )}
          {/* Below desktop width (the bench tablet) the navigation folds behind this button, so the page gets the whole width. */}
          <button type="button" aria-expanded={menuOpen} aria-controls="main-nav" onClick={() => setMenuOpen((o) => !o)}
            className="inline-flex min-h-11 items-center gap-2 rounded-md border border-spruce-200/40 px-3 font-semibold text-white desk:hidden">
            <span aria-hidden>{menuOpen ? '✕' : '☰'}</span> Menu
          </button>
        </div>
        <div id="main-nav" className={`${menuOpen ? 'block' : 'hidden'} border-t border-spruce-700 desk:block desk:border-0`}>
          <nav aria-label="Main" className="grid gap-1 px-2 py-2 sm:grid-cols-3 desk:flex desk:flex-col desk:py-0 desk:pb-3">
            {navFor(user.role).map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                onClick={() => setMenuOpen(false)}
                className={({ isActive }) =>
                  `flex min-h-11 shrink-0 items-center rounded-md px-3 font-semibold ${isActive ? 'bg-paper text-spruce-900' : 'text-spruce-100 hover:bg-spruce-800'}`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="flex flex-wrap items-center gap-x-4 border-t border-spruce-700 px-4 py-2 desk:block desk:py-4">
            <p className="font-semibold text-white">{user.name}</p>
            <p className="text-sm text-spruce-200">{ROLE_LABELS[user.role]}</p>
            <button type="button" className="min-h-11 font-semibold text-amber-400 underline desk:mt-2" onClick={signOut}>
              Sign out
            </button>
          </div>
        </div>
      </aside>
      <main id="main" className="mx-auto w-full max-w-6xl p-4 md:p-6 desk:p-8">
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
