// ESLint flat config: ESLint's and typescript-eslint's recommended rules everywhere, React's hook
// rules for the web code, and Next's recommended + core-web-vitals rules for the pages and components.
// `npm run lint` (and scripts/test.sh) runs it with --max-warnings 0.
import js from "@eslint/js";
import { defineConfig, globalIgnores } from "eslint/config";
import nextPlugin from "@next/eslint-plugin-next";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import tseslint from "typescript-eslint";

export default defineConfig(
  // Installed, built or generated: never linted.
  globalIgnores([
    "node_modules/",
    ".next/",
    ".next-*/",
    ".data/",
    "coverage/",
    "drizzle/",
    "public/",
    "src/engine/native/build/",
    "dist/",
    "tests/e2e/screenshots/",
    "next-env.d.ts",
  ]),
  js.configs.recommended,
  // Also turns off the core rules TypeScript already checks (no-undef, ...) in .ts/.tsx files only.
  ...tseslint.configs.recommended,
  {
    languageOptions: {
      ecmaVersion: 2023,
      sourceType: "module",
      // Server code, scripts and tests run on Node; the web code and engine also run in the browser.
      globals: { ...globals.node, ...globals.browser },
    },
    linterOptions: { reportUnusedDisableDirectives: "error" },
    rules: {
      // `const { dropped: _x, ...rest } = o` is how the code copies an object without some fields.
      "@typescript-eslint/no-unused-vars": ["error", { ignoreRestSiblings: true }],
    },
  },
  {
    // Hooks live in the web code only (components, app routes, client helpers).
    files: ["src/**/*.{ts,tsx}"],
    ...reactHooks.configs.flat.recommended,
  },
  {
    files: ["src/app/**/*.{ts,tsx}", "src/components/**/*.{ts,tsx}"],
    plugins: { "@next/next": nextPlugin },
    rules: { ...nextPlugin.configs.recommended.rules, ...nextPlugin.configs["core-web-vitals"].rules },
    settings: { next: { rootDir: "." } },
  },
);
