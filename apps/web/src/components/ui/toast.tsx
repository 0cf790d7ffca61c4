import { createContext, useCallback, useContext, useMemo, useRef, useState, type ReactNode } from "react";
import { Notice, type NoticeTone } from "./notice.tsx";

export interface ToastInput {
  title: ReactNode;
  description?: ReactNode;
  tone?: NoticeTone;
  /** Milliseconds before it goes away; 0 keeps it until dismissed. Default 5000. */
  duration?: number;
}

interface ToastItem extends ToastInput {
  id: number;
}

type ToastFn = (toast: ToastInput) => void;

const ToastContext = createContext<ToastFn | null>(null);

/** Holds the stack of short-lived messages shown at the bottom right. Mounted once in the app provider. */
export function ToastProvider({ children }: { children: ReactNode }) {
  const [items, setItems] = useState<ToastItem[]>([]);
  const next = useRef(1);
  const dismiss = useCallback((id: number) => setItems((xs) => xs.filter((x) => x.id !== id)), []);
  const toast = useCallback<ToastFn>(
    (t) => {
      const id = next.current++;
      setItems((xs) => [...xs.slice(-3), { ...t, id }]);
      const duration = t.duration ?? 5000;
      if (duration > 0) setTimeout(() => dismiss(id), duration);
    },
    [dismiss],
  );
  const value = useMemo(() => toast, [toast]);
  return (
    <ToastContext.Provider value={value}>
      {children}
      <div
        aria-live="polite"
        className="no-print pointer-events-none fixed right-4 bottom-4 z-50 flex w-80 flex-col gap-2"
      >
        {items.map((t) => (
          <div key={t.id} className="pointer-events-auto shadow-lg">
            <Notice
              tone={t.tone ?? "info"}
              title={t.title}
              onDismiss={() => dismiss(t.id)}
              className="bg-white"
            >
              {t.description}
            </Notice>
          </div>
        ))}
      </div>
    </ToastContext.Provider>
  );
}

/** Returns `toast({title, description?, tone?, duration?})`. Outside a ToastProvider it does nothing. */
export function useToast(): ToastFn {
  return useContext(ToastContext) ?? noop;
}

function noop() {}
