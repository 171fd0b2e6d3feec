"use client";

import { useEffect, useState } from "react";

type Theme = "system" | "light" | "dark";
const KEY = "triskel.theme";

/** Light, dark or follow the system; stored in this browser only. */
export function ThemeSwitch() {
  const [theme, setTheme] = useState<Theme>("system");
  useEffect(() => {
    const saved = (localStorage.getItem(KEY) as Theme | null) ?? "system";
    setTheme(saved);
  }, []);
  useEffect(() => {
    const html = document.documentElement;
    html.classList.remove("light", "dark");
    if (theme !== "system") html.classList.add(theme);
    localStorage.setItem(KEY, theme);
    window.dispatchEvent(new Event("triskel-theme"));
  }, [theme]);
  return (
    <label className="flex items-center gap-2 text-caption text-fg-faint">
      <span>Theme</span>
      <select className="rounded-field border border-line bg-surface px-1.5 py-0.5 text-caption text-fg" value={theme} onChange={(e) => setTheme(e.target.value as Theme)}>
        <option value="system">System</option>
        <option value="light">Light</option>
        <option value="dark">Dark</option>
      </select>
    </label>
  );
}
