import type { Config } from "tailwindcss";

// Triskel design tokens: our own palette ("ink", "paper", "wall" teal, "spark" amber),
// type scale and spacing. Dark mode follows the `dark` class on <html>.
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
        alarm: { 100: "#fbe3e1", 500: "#c0392b", 700: "#8e2417" },
      },
      fontFamily: {
        sans: ["var(--font-sans)", "system-ui", "sans-serif"],
        mono: ["var(--font-mono)", "ui-monospace", "monospace"],
      },
      fontSize: {
        caption: ["0.75rem", { lineHeight: "1rem" }],
        body: ["0.9375rem", { lineHeight: "1.5rem" }],
        lead: ["1.125rem", { lineHeight: "1.75rem" }],
        title: ["1.5rem", { lineHeight: "2rem", letterSpacing: "-0.01em" }],
        display: ["2.75rem", { lineHeight: "3.1rem", letterSpacing: "-0.02em" }],
      },
      borderRadius: { card: "0.875rem" },
      spacing: { gutter: "1.25rem" },
    },
  },
};

export default config;
