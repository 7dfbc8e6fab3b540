import { useEffect, useRef, type ReactNode } from 'react';

/**
 * A native modal dialog that is open while `open` is true; Escape or the backdrop's close calls
 * `onClose`. Its title names it for assistive technology.
 */
export function Dialog({ open, title, onClose, children }: { open: boolean; title: string; onClose: () => void; children: ReactNode }) {
  const ref = useRef<HTMLDialogElement>(null);
  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);
  return (
    <dialog ref={ref} aria-label={title} onClose={onClose} className="m-auto w-[min(36rem,calc(100vw-2rem))] rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
      <h2 className="mb-3 text-xl font-bold text-spruce-900">{title}</h2>
      {open ? children : null}
    </dialog>
  );
}
