// The width of an element as laid out, for charts drawn to the pixel. Falls back to a
// sensible width where layout is not measured (tests in happy-dom).
import { useEffect, useRef, useState } from 'react';

export function useWidth<E extends HTMLElement>(fallback: number): [React.RefObject<E | null>, number] {
  const ref = useRef<E>(null);
  const [width, setWidth] = useState(fallback);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const measure = () => {
      const w = el.getBoundingClientRect().width;
      if (w > 0) setWidth(Math.floor(w));
    };
    measure();
    if (typeof ResizeObserver === 'undefined') return;
    const observer = new ResizeObserver(measure);
    observer.observe(el);
    return () => observer.disconnect();
  }, []);
  return [ref, width];
}
