import { useEffect, useId, useState, type ReactNode } from 'react';

interface Props {
  /** The anchor other parts of the page link to (`#id`). */
  id: string;
  title: string;
  /** One line that stays visible when the section is folded, e.g. "3 of 51 parts short". */
  summary?: ReactNode;
  /** Starts folded; long sections do, so the page opens on what needs doing. */
  defaultOpen?: boolean;
  /** Buttons and links beside the title. */
  actions?: ReactNode;
  children: ReactNode;
}

/** A titled part of a page that folds away: the title is a button that shows or hides its body. */
export function Section({ id, title, summary, defaultOpen = true, actions, children }: Props) {
  const [open, setOpen] = useState(defaultOpen);
  const bodyId = useId();
  // A link to `#id` (the page's "next step" button) unfolds the section it points at.
  useEffect(() => {
    const follow = () => { if (window.location.hash === `#${id}`) setOpen(true); };
    follow();
    window.addEventListener('hashchange', follow);
    return () => window.removeEventListener('hashchange', follow);
  }, [id]);
  return (
    <section id={id} aria-labelledby={`${id}-heading`} className="scroll-mt-20 rounded-lg bg-white shadow-sm">
      <div className="flex flex-wrap items-center justify-between gap-2 px-4 py-2 sm:px-6">
        <h2 id={`${id}-heading`} className="text-xl font-bold text-spruce-900">
          <button type="button" aria-expanded={open} aria-controls={bodyId} onClick={() => setOpen((o) => !o)}
            className="inline-flex min-h-11 items-center gap-2 text-left">
            <span aria-hidden className={`inline-block transition-transform ${open ? 'rotate-90' : ''}`}>▸</span>
            {title}
          </button>
        </h2>
        {actions ? <div className="flex flex-wrap gap-2">{actions}</div> : null}
        {summary ? <p className="w-full pl-6 text-ink-soft">{summary}</p> : null}
      </div>
      <div id={bodyId} hidden={!open} className="border-t border-spruce-700/10 px-4 py-4 sm:px-6">
        {children}
      </div>
    </section>
  );
}
