import { useEffect, useRef, useState } from "react";

/**
 * The rendered width of an element in CSS pixels, kept current as it resizes. The server (and the
 * first client render, so hydration matches) uses the fallback. Plots draw at this width so one SVG
 * unit is one CSS pixel and their text keeps its size on a phone instead of shrinking with a viewBox.
 */
export function useMeasuredWidth<T extends Element>(fallback: number) {
  const ref = useRef<T>(null);
  const [width, setWidth] = useState(fallback);
  useEffect(() => {
    const element = ref.current;
    if (!element) return;
    const observer = new ResizeObserver(([entry]) => {
      if (entry.contentRect.width > 0) setWidth(entry.contentRect.width);
    });
    observer.observe(element);
    return () => observer.disconnect();
  }, []);
  return { ref, width };
}
