// A button that opens a small panel of links or actions below it; closes on Escape, a click outside or a choice.
import { useEffect, useId, useRef, useState, type ReactNode } from 'react';

export function MenuButton({ label, children, className = '', align = 'right', testId }: {
  label: ReactNode;
  /** The panel; `close` lets an entry shut it after a choice. */
  children: (close: () => void) => ReactNode;
  className?: string;
  align?: 'left' | 'right';
  testId?: string;
}) {
  const [open, setOpen] = useState(false);
  const id = useId();
  const root = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!open) return;
    const onDown = (e: PointerEvent) => {
      if (root.current && !root.current.contains(e.target as Node)) setOpen(false);
    };
    const onKey = (e: KeyboardEvent) => {
      if (e.key === 'Escape') setOpen(false);
    };
    document.addEventListener('pointerdown', onDown);
    document.addEventListener('keydown', onKey);
    return () => {
      document.removeEventListener('pointerdown', onDown);
      document.removeEventListener('keydown', onKey);
    };
  }, [open]);
  return (
    <div ref={root} className={`relative ${className}`}>
      <button
        type="button"
        aria-expanded={open}
        aria-controls={id}
        data-testid={testId}
        onClick={() => setOpen((o) => !o)}
        className="flex min-h-10 items-center gap-1 whitespace-nowrap rounded-lg px-3 py-2 text-sm font-semibold text-ink-100 hover:bg-ink-700"
      >
        {label} <span aria-hidden>▾</span>
      </button>
      {open && (
        <div id={id} className={`absolute top-full z-50 mt-1 min-w-48 rounded-xl border border-ink-700 bg-ink-900 p-1 shadow-lg ${align === 'right' ? 'right-0' : 'left-0'}`}>
          {children(() => setOpen(false))}
        </div>
      )}
    </div>
  );
}
