import { useEffect, useId, useRef, type ReactNode } from 'react';
import { Button } from './Button';

interface Props {
  /** Open while this is true; closing (Escape, the cancel button) calls onCancel. */
  open: boolean;
  title: string;
  children?: ReactNode;
  confirmLabel: string;
  cancelLabel?: string;
  tone?: 'danger' | 'primary';
  busy?: boolean;
  onConfirm: () => void;
  onCancel: () => void;
}

/** A question before an action, in a native modal dialog, opened and closed by its parent. */
export function ConfirmDialog({ open, title, children, confirmLabel, cancelLabel = 'Keep it as it is', tone = 'primary', busy, onConfirm, onCancel }: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  useEffect(() => {
    const d = dialog.current;
    if (!d) return;
    if (open && !d.open) d.showModal();
    if (!open && d.open) d.close();
  }, [open]);
  return (
    <dialog ref={dialog} aria-labelledby={titleId} onCancel={(e) => { e.preventDefault(); onCancel(); }}
      className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
      <h2 id={titleId} className="mb-3 text-xl font-bold text-spruce-900">{title}</h2>
      <div className="mb-5 text-ink">{children}</div>
      <div className="flex flex-wrap justify-end gap-2">
        <Button type="button" variant="secondary" onClick={onCancel}>{cancelLabel}</Button>
        <Button type="button" variant={tone === 'danger' ? 'danger' : 'primary'} busy={busy} onClick={onConfirm}>{confirmLabel}</Button>
      </div>
    </dialog>
  );
}
