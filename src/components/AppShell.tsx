import { NavLink, Navigate, Outlet, useLocation, useNavigate } from 'react-router';
import { Suspense } from 'react';
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
  if (session.isPending) return <Loading label="Checking your session…" />;
  if (session.isError) return <div className="p-6"><ErrorState error={session.error} retry={() => session.refetch()} /></div>;
  const user = session.data;
  if (!user) return <Navigate to={paths.signIn} replace state={{ from: location.pathname }} />;

  return (
    <div className="min-h-screen md:grid md:grid-cols-[15rem_1fr]">
      <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:top-2 focus:left-2 focus:z-50 focus:bg-white focus:p-2">
        Skip to content
      </a>
      <aside className="bg-spruce-900 text-spruce-100 md:min-h-screen">
        <div className="flex items-center gap-3 px-4 py-4">
          {user.role === 'customer' ? (
            <span className="text-white"><ShopIdentity /></span>
          ) : (
            <>
              <Logo />
              <div>
                <p className="text-xl font-bold tracking-tight text-white">Kneepoint</p>
                <p className="text-xs text-spruce-200">{shopName ? `Production at ${shopName}` : 'Workshop production'}</p>
              </div>
            </>
          )}
        </div>
        <nav aria-label="Main" className="flex gap-1 overflow-x-auto px-2 pb-3 md:flex-col md:overflow-visible">
          {navFor(user.role).map((item) => (
            <NavLink
              key={item.to}
              to={item.to}
              className={({ isActive }) =>
                `flex min-h-11 shrink-0 items-center rounded-md px-3 font-semibold ${isActive ? 'bg-paper text-spruce-900' : 'text-spruce-100 hover:bg-spruce-800'}`
              }
            >
              {item.label}
            </NavLink>
          ))}
        </nav>
        <div className="hidden border-t border-spruce-700 px-4 py-4 md:block">
          <p className="font-semibold text-white">{user.name}</p>
          <p className="text-sm text-spruce-200">{ROLE_LABELS[user.role]}</p>
          <button
            type="button"
            className="mt-2 min-h-11 font-semibold text-amber-400 underline"
            onClick={() => logout.mutate(undefined, { onSuccess: () => navigate(paths.signIn) })}
          >
            Sign out
          </button>
        </div>
      </aside>
      <main id="main" className="mx-auto w-full max-w-6xl p-4 md:p-8">
        <div className="mb-4 flex justify-end md:hidden">
          <button type="button" className="min-h-11 font-semibold text-copper-700 underline" onClick={() => logout.mutate(undefined, { onSuccess: () => navigate(paths.signIn) })}>
            Sign out ({user.name})
          </button>
        </div>
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
