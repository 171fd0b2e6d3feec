"use client";

import { useEffect, useRef, useState } from "react";
import { readPalette, type Palette } from "./palette";

/** Width of a container (ResizeObserver), never below `min`. */
export function useWidth(initial: number, min: number) {
  const ref = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(initial);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const ro = new ResizeObserver(([e]) => setWidth(Math.max(min, Math.floor(e.contentRect.width))));
    ro.observe(el);
    return () => ro.disconnect();
  }, [min]);
  return { ref, width };
}

/**
 * The theme's drawing colours, read again when the theme switch changes them and, with
 * `followSystem`, when the system's light / dark preference changes.
 */
export function usePalette(followSystem = false) {
  const [palette, setPalette] = useState<Palette | null>(null);
  useEffect(() => {
    const onTheme = () => setPalette(readPalette());
    onTheme();
    window.addEventListener("triskel-theme", onTheme);
    const mq = followSystem ? window.matchMedia("(prefers-color-scheme: dark)") : null;
    mq?.addEventListener("change", onTheme);
    return () => {
      window.removeEventListener("triskel-theme", onTheme);
      mq?.removeEventListener("change", onTheme);
    };
  }, [followSystem]);
  return palette;
}

/** Width of a container (ResizeObserver) and the theme's drawing colours. */
export function useChartBox(initial = 560) {
  const { ref, width } = useWidth(initial, 280);
  const palette = usePalette();
  return { ref, width, palette };
}
