// Same small hook as the studies feature keeps (features do not import each other).
import { useEffect, useRef, useState } from "react";

/** Width of an element, followed with a ResizeObserver (falls back to `initial` where there is none). */
export function useElementWidth<T extends HTMLElement>(initial = 760) {
  const ref = useRef<T>(null);
  const [width, setWidth] = useState(initial);
  useEffect(() => {
    const el = ref.current;
    if (!el || typeof ResizeObserver === "undefined") return;
    const ro = new ResizeObserver((entries) => {
      const w = entries[0]?.contentRect.width;
      if (w && w > 0) setWidth(Math.floor(w));
    });
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  return [ref, width] as const;
}
