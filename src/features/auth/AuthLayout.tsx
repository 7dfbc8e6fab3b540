import type { ReactNode } from 'react';
import { Link } from 'react-router';
import { paths } from '../../lib/navigation';
import { ShopIdentity } from '../../components/ShopIdentity';

/** The frame of the sign-in, registration and password reset pages, with the way back to the shop. */
export function AuthLayout({ title, children }: { title: string; children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col items-center justify-center bg-spruce-900 px-4 py-10">
      <div className="mb-6 flex items-center gap-3 text-white">
        <div>
          <p><ShopIdentity size="lg" /></p>
          <p className="text-spruce-200">Hand-built pedals, from bench to box</p>
        </div>
      </div>
      <main className="w-full max-w-md rounded-xl bg-paper p-6 shadow-2xl sm:p-8">
        <h1 className="mb-4 text-2xl font-bold text-spruce-900">{title}</h1>
        {children}
      </main>
      <nav aria-label="Back" className="mt-4">
        <Link to={paths.shop} className="flex min-h-11 items-center rounded-md px-3 font-semibold text-white underline hover:bg-spruce-800">
          <span aria-hidden>←&nbsp;</span>Back to the pedals
        </Link>
      </nav>
    </div>
  );
}
