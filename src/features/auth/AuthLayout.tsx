import type { ReactNode } from 'react';
import { Logo } from '../../components/Logo';

/** The frame of the sign-in and registration pages. */
export function AuthLayout({ title, children }: { title: string; children: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col items-center justify-center bg-spruce-900 px-4 py-10">
      <div className="mb-6 flex items-center gap-3 text-white">
        <Logo size={44} />
        <div>
          <p className="text-3xl font-bold tracking-tight">Kneepoint</p>
          <p className="text-spruce-200">Hand-built pedals, from bench to box</p>
        </div>
      </div>
      <main className="w-full max-w-md rounded-xl bg-paper p-6 shadow-2xl sm:p-8">
        <h1 className="mb-4 text-2xl font-bold text-spruce-900">{title}</h1>
        {children}
      </main>
    </div>
  );
}
