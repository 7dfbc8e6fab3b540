import type { ReactNode } from 'react';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" className="flex items-center gap-3 p-6 text-ink-soft">
      <span aria-hidden className="size-5 animate-spin rounded-full border-2 border-spruce-700 border-t-transparent" />
      {label}
    </div>
  );
}

export function ErrorState({ error, retry }: { error: unknown; retry?: () => void }) {
  const message = error instanceof Error ? error.message : 'Something went wrong';
  return (
    <div role="alert" className="rounded-lg border border-alarm-700/40 bg-alarm-100 p-4 text-alarm-700">
      <p className="font-semibold">{message}</p>
      {retry ? (
        <button type="button" onClick={retry} className="mt-2 min-h-11 font-semibold underline">
          Try again
        </button>
      ) : null}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-spruce-700/40 bg-white/60 p-8 text-center">
      <p className="text-lg font-semibold text-ink">{title}</p>
      {children ? <div className="mt-2 text-ink-soft">{children}</div> : null}
    </div>
  );
}

export function Notice({ tone = 'info', children }: { tone?: 'info' | 'good' | 'alarm'; children: ReactNode }) {
  const styles = {
    info: 'border-spruce-700/30 bg-spruce-100 text-spruce-900',
    good: 'border-good-700/30 bg-good-100 text-good-700',
    alarm: 'border-alarm-700/30 bg-alarm-100 text-alarm-700',
  }[tone];
  return (
    <div role={tone === 'alarm' ? 'alert' : 'status'} className={`rounded-md border p-3 font-semibold ${styles}`}>
      {children}
    </div>
  );
}

export function PageHeader({ title, children }: { title: ReactNode; children?: ReactNode }) {
  return (
    <header className="mb-6 flex flex-wrap items-end justify-between gap-4 border-b border-spruce-700/20 pb-4">
      <h1 className="text-3xl font-bold tracking-tight text-spruce-900">{title}</h1>
      {children ? <div className="flex flex-wrap gap-2">{children}</div> : null}
    </header>
  );
}
