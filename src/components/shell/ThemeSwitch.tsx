"use client";

import { useEffect, useSyncExternalStore } from "react";

type Theme = "system" | "light" | "dark";
const KEY = "triskel.theme";
const EVENT = "triskel-theme";

/** The theme stored in this browser ("system" in the server's HTML and when none is stored). */
function storedTheme(): Theme {
  const t = localStorage.getItem(KEY);
  return t === "light" || t === "dark" ? t : "system";
}

/** The class on <html> that the colour variables follow (none: the system's preference). */
function applyTheme(theme: Theme): void {
  const html = document.documentElement;
  html.classList.remove("light", "dark");
  if (theme !== "system") html.classList.add(theme);
}

function subscribe(onChange: () => void): () => void {
  window.addEventListener(EVENT, onChange);
  window.addEventListener("storage", onChange);
  return () => {
    window.removeEventListener(EVENT, onChange);
    window.removeEventListener("storage", onChange);
  };
}

/** Light, dark or follow the system; stored in this browser only. */
export function ThemeSwitch() {
  const theme = useSyncExternalStore(subscribe, storedTheme, () => "system" as const);
  useEffect(() => applyTheme(theme), [theme]);
  const choose = (t: Theme) => {
    localStorage.setItem(KEY, t);
    applyTheme(t);
    // The charts and drawings re-read their colours on this event (after the class changed).
    window.dispatchEvent(new Event(EVENT));
  };
  return (
    <label className="flex items-center gap-2 text-caption text-fg-faint">
      <span>Theme</span>
      <select
        className="rounded-field border border-line bg-surface px-1.5 py-0.5 text-caption text-fg"
        value={theme}
        onChange={(e) => choose(e.target.value as Theme)}
      >
        <option value="system">System</option>
        <option value="light">Light</option>
        <option value="dark">Dark</option>
      </select>
    </label>
  );
}
