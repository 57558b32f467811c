"use client";

import { useEffect, useState, type RefObject } from "react";

/**
 * The element's content width, followed as it resizes. Charts are drawn at this width instead of scaled down from
 * Plot's default 640 px, so their text keeps its size on a phone.
 */
export function useWidth(ref: RefObject<HTMLElement | null>, fallback = 640): number {
  const [width, setWidth] = useState(fallback);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const measure = () => setWidth(Math.max(240, Math.floor(el.clientWidth) || fallback));
    measure();
    const observer = new ResizeObserver(measure);
    observer.observe(el);
    return () => observer.disconnect();
  }, [ref, fallback]);
  return width;
}
