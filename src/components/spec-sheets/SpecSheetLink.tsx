import { sheetPdfUrl } from './api';

interface Props {
  serial: string;
  /** e.g. "Spec sheet (PDF)"; the serial is added for screen readers when it is not in the label. */
  label?: string;
  variant?: 'button' | 'link';
}

/** A plain link to the unit's PDF: the browser opens or saves it with the session cookie, no script needed. */
export function SpecSheetLink({ serial, label = 'Download spec sheet', variant = 'button' }: Props) {
  const look = variant === 'button'
    ? 'inline-flex min-h-11 items-center justify-center gap-2 rounded-md border border-spruce-700/40 bg-white px-4 py-2 font-semibold text-ink hover:bg-spruce-100'
    : 'inline-flex min-h-11 items-center font-semibold text-copper-700 underline underline-offset-2';
  return (
    <a href={sheetPdfUrl(serial)} download={`spec-sheet-${serial}.pdf`} className={look} aria-label={label.includes(serial) ? undefined : `${label} for ${serial}`}>
      <span aria-hidden>⤓</span>
      {label}
    </a>
  );
}
