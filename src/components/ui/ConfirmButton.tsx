import { useRef, type ReactNode } from 'react';
import { Button } from './Button';

interface Props {
  label: ReactNode;
  question: string;
  confirmLabel: string;
  onConfirm: () => void;
  variant?: 'danger' | 'secondary';
  busy?: boolean;
}

/** A button that asks before a destructive action, in a native modal dialog. */
export function ConfirmButton({ label, question, confirmLabel, onConfirm, variant = 'danger', busy }: Props) {
  const dialog = useRef<HTMLDialogElement>(null);
  return (
    <>
      <Button type="button" variant={variant} busy={busy} onClick={() => dialog.current?.showModal()}>
        {label}
      </Button>
      <dialog ref={dialog} className="m-auto max-w-md rounded-lg p-6 shadow-xl backdrop:bg-spruce-950/50">
        <p className="mb-4 text-lg text-ink">{question}</p>
        <div className="flex justify-end gap-2">
          <Button type="button" variant="secondary" onClick={() => dialog.current?.close()}>
            Keep it
          </Button>
          <Button
            type="button"
            variant={variant === 'danger' ? 'danger' : 'primary'}
            onClick={() => {
              dialog.current?.close();
              onConfirm();
            }}
          >
            {confirmLabel}
          </Button>
        </div>
      </dialog>
    </>
  );
}
