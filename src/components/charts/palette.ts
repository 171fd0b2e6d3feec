/** Colours of the drawings, read from the theme's CSS variables (globals.css). */
export interface Palette {
  link: string;
  linkAlt: string;
  node: string;
  lead: string;
  grid: string;
  fg: string;
  faint: string;
  surface: string;
  /** The page background behind the cards. */
  canvas: string;
  accent: string;
  warm: string;
  danger: string;
}

export function readPalette(): Palette {
  const s = getComputedStyle(document.documentElement);
  const v = (name: string, fallback: string) => s.getPropertyValue(`--tk-${name}`).trim() || fallback;
  return {
    link: v("plot-link", "#1f8f7d"),
    linkAlt: v("plot-link-alt", "#d9891a"),
    node: v("plot-node", "#14212b"),
    lead: v("plot-lead", "#d9891a"),
    grid: v("plot-grid", "#e4dfd2"),
    fg: v("fg", "#14212b"),
    faint: v("fg-faint", "#5b6b75"),
    surface: v("surface", "#ffffff"),
    canvas: v("canvas", "#f6f4ee"),
    accent: v("accent", "#146657"),
    warm: v("warm", "#9a5b08"),
    danger: v("danger", "#8e2417"),
  };
}
