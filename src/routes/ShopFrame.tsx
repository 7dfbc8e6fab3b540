import { Link, Outlet, useLocation } from 'react-router';
import { Suspense } from 'react';
import { AppShell } from '../components/AppShell';
import { ShopIdentity } from '../components/ShopIdentity';
import { Loading } from '../components/ui/states';
import { useSession } from '../features/auth/api';
import { useCart } from '../features/shop/cart';
import { paths } from '../lib/navigation';

/** The storefront's frame: the role's shell when signed in, a light header for visitors. */
export function ShopFrame() {
  const session = useSession();
  const location = useLocation();
  const count = useCart().reduce((n, l) => n + l.quantity, 0);
  if (session.isPending) return <Loading label="Opening the shop…" />;
  if (session.data) return <AppShell />;
  return (
    <div className="min-h-screen">
      <header className="flex flex-wrap items-center justify-between gap-3 bg-spruce-900 px-4 py-3 text-white">
        <Link to={paths.shop} className="flex min-h-11 items-center gap-3 font-bold">
          <ShopIdentity />
        </Link>
        <nav aria-label="Visitor" className="flex flex-wrap gap-2">
          <Link to={paths.cart} className="flex min-h-11 items-center rounded-md px-3 font-semibold hover:bg-spruce-800">Cart{count > 0 ? ` (${count})` : ''}</Link>
          <Link to={paths.signIn} state={{ from: location.pathname }} className="flex min-h-11 items-center rounded-md px-3 font-semibold hover:bg-spruce-800">Sign in</Link>
          <Link to={paths.register} className="flex min-h-11 items-center rounded-md bg-copper-600 px-3 font-semibold hover:bg-copper-700">Create account</Link>
        </nav>
      </header>
      <main id="main" className="mx-auto w-full max-w-6xl p-4 md:p-8">
        <Suspense fallback={<Loading />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}
