import type { Config } from "tailwindcss";

// Triskel design tokens.
// Raw palette: "ink" (blue-black), "paper" (warm off-white), "wall" (teal, the domain walls),
// "spark" (amber, the moving charge), "alarm" (brick red). Components use the semantic names
// below (canvas, surface, fg, line, accent, ...), which are CSS variables set in globals.css
// for light and dark, so one class serves both themes. Dark follows the system unless the
// `light` or `dark` class is set on <html> (the theme switch in the app shell).
const v = (name: string) => `var(--tk-${name})`;

const config: Config = {
  darkMode: "class",
  content: ["./src/**/*.{ts,tsx}"],
  theme: {
    extend: {
      colors: {
        ink: { DEFAULT: "#14212b", soft: "#2c3e4a", faint: "#5b6b75" },
        paper: { DEFAULT: "#f6f4ee", raised: "#ffffff", sunk: "#ebe7dc" },
        wall: { 50: "#eef8f6", 100: "#d3eee8", 300: "#7fcabb", 500: "#1f8f7d", 700: "#146657", 900: "#0b3b33" },
        spark: { 100: "#fdf0d5", 300: "#f6c56b", 500: "#d9891a", 700: "#9a5b08" },
        alarm: { 100: "#fbe3e1", 300: "#ec9a90", 500: "#c0392b", 700: "#8e2417" },
        // Semantic (theme-aware) tokens.
        canvas: v("canvas"),
        surface: { DEFAULT: v("surface"), sunk: v("surface-sunk") },
        fg: { DEFAULT: v("fg"), soft: v("fg-soft"), faint: v("fg-faint") },
        line: { DEFAULT: v("line"), strong: v("line-strong") },
        accent: { DEFAULT: v("accent"), strong: v("accent-strong"), soft: v("accent-soft"), fg: v("accent-fg") },
        warm: { DEFAULT: v("warm"), soft: v("warm-soft") },
        danger: { DEFAULT: v("danger"), soft: v("danger-soft") },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      fontSize: {
        micro: ["0.6875rem", { lineHeight: "0.875rem", letterSpacing: "0.02em" }],
        caption: ["0.75rem", { lineHeight: "1rem" }],
        body: ["0.9375rem", { lineHeight: "1.5rem" }],
        lead: ["1.125rem", { lineHeight: "1.75rem" }],
        title: ["1.5rem", { lineHeight: "2rem", letterSpacing: "-0.01em" }],
        display: ["2.75rem", { lineHeight: "3.1rem", letterSpacing: "-0.02em" }],
      },
      borderRadius: { card: "0.875rem", field: "0.5rem" },
      spacing: { gutter: "1.25rem", rail: "15rem" },
      boxShadow: { card: "0 1px 0 0 var(--tk-line), 0 8px 24px -16px rgb(0 0 0 / 0.25)" },
    },
  },
};

export default config;
