"use client";

import { useEffect, useRef, useState } from "react";
import { readPalette, type Palette } from "./palette";

/** Width of a container (ResizeObserver) and the theme's drawing colours. */
export function useChartBox(initial = 560) {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(initial);
  const [palette, setPalette] = useState<Palette | null>(null);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const ro = new ResizeObserver(([e]) => setWidth(Math.max(280, Math.floor(e.contentRect.width))));
    ro.observe(el);
    const onTheme = () => setPalette(readPalette());
    onTheme();
    window.addEventListener("triskel-theme", onTheme);
    return () => {
      ro.disconnect();
      window.removeEventListener("triskel-theme", onTheme);
    };
  }, []);
  return { ref, width, palette };
}
