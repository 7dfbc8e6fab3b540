import { useEffect, useId, useRef, useState, type ReactNode } from 'react';

export interface RowMenuItem {
  label: string;
  onSelect: () => void;
  tone?: 'danger';
}

/**
 * A row's less common actions behind one quiet button ("More for Ada"), so rare or risky ones
 * (Deactivate) don't line the table. Opens a menu: arrow keys move, Escape closes and returns
 * focus, a click elsewhere closes it.
 */
export function RowMenu({ label, items, children = 'More' }: { label: string; items: RowMenuItem[]; children?: ReactNode }) {
  const [open, setOpen] = useState(false);
  const id = useId();
  const button = useRef<HTMLButtonElement>(null);
  const menu = useRef<HTMLDivElement>(null);
  const entries = () => [...(menu.current?.querySelectorAll<HTMLButtonElement>('[role="menuitem"]') ?? [])];

  useEffect(() => {
    if (!open) return;
    entries()[0]?.focus();
    const close = (event: MouseEvent) => {
      if (!menu.current?.contains(event.target as Node) && !button.current?.contains(event.target as Node)) setOpen(false);
    };
    document.addEventListener('mousedown', close);
    return () => document.removeEventListener('mousedown', close);
  }, [open]);

  const onKeyDown = (event: React.KeyboardEvent) => {
    const list = entries();
    const at = list.indexOf(document.activeElement as HTMLButtonElement);
    if (event.key === 'Escape') { setOpen(false); button.current?.focus(); }
    else if (event.key === 'ArrowDown') { event.preventDefault(); list[(at + 1) % list.length]?.focus(); }
    else if (event.key === 'ArrowUp') { event.preventDefault(); list[(at - 1 + list.length) % list.length]?.focus(); }
    else if (event.key === 'Tab') setOpen(false);
  };

  return (
    <div className="relative inline-block">
      <button ref={button} type="button" aria-label={label} aria-haspopup="menu" aria-expanded={open} aria-controls={open ? id : undefined}
        onClick={() => setOpen((o) => !o)}
        className="inline-flex min-h-11 min-w-11 items-center justify-center gap-1 rounded-md px-3 font-semibold text-spruce-800 hover:bg-spruce-100">
        {children}<span aria-hidden="true">▾</span>
      </button>
      {open ? (
        <div ref={menu} id={id} role="menu" aria-label={label} onKeyDown={onKeyDown}
          className="absolute right-0 z-20 mt-1 flex min-w-48 flex-col rounded-md border border-spruce-700/20 bg-white py-1 shadow-lg">
          {items.map((item) => (
            <button key={item.label} type="button" role="menuitem" tabIndex={-1}
              onClick={() => { setOpen(false); item.onSelect(); }}
              className={`min-h-11 px-4 text-left font-semibold hover:bg-spruce-100 focus:bg-spruce-100 ${item.tone === 'danger' ? 'text-alarm-700' : 'text-ink'}`}>
              {item.label}
            </button>
          ))}
        </div>
      ) : null}
    </div>
  );
}
