import { createContext, useCallback, useContext, useEffect, useRef, useState, type ReactNode } from 'react';

interface Toast {
  id: number;
  message: string;
  tone: 'good' | 'alarm';
}

const ToastContext = createContext<(message: string, tone?: Toast['tone']) => void>(() => {});

/** How long a message stays, from the last one shown. */
const SHOW_MS = 5000;

/**
 * Says the result of an action in words, in a polite live region. One message at a time: a new
 * one replaces the last (quick taps at the bench never pile messages up), and it sits at the
 * bottom of the screen, clear of the page's title. Taps go through it to whatever is beneath (a
 * button in the corner stays usable while a message shows), and it is see-through enough to read
 * what it covers.
 */
export function ToastProvider({ children }: { children: ReactNode }) {
  const [toast, setToast] = useState<Toast | null>(null);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const show = useCallback((message: string, tone: Toast['tone'] = 'good') => {
    if (timer.current) clearTimeout(timer.current);
    setToast({ id: Date.now() + Math.random(), message, tone });
    timer.current = setTimeout(() => setToast(null), SHOW_MS);
  }, []);
  useEffect(() => () => { if (timer.current) clearTimeout(timer.current); }, []);
  return (
    <ToastContext.Provider value={show}>
      {children}
      <div aria-live="polite" className="pointer-events-none fixed inset-x-4 bottom-4 z-50 flex justify-end">
        {toast ? (
          <div
            key={toast.id}
            role="status"
            className={`max-w-xl rounded-md px-4 py-3 font-semibold opacity-95 shadow-lg ${toast.tone === 'good' ? 'bg-spruce-900 text-white' : 'bg-alarm-700 text-white'}`}
          >
            {toast.message}
          </div>
        ) : null}
      </div>
    </ToastContext.Provider>
  );
}

export const useToast = () => useContext(ToastContext);
