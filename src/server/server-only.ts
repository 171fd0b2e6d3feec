/**
 * Marker for modules that touch the database, the queue or secrets (database and Redis URLs,
 * payment and sign-in keys, SMTP): each of them imports this module first,
 *
 *   import "@/server/server-only";
 *
 * and it throws when it is loaded in a browser. The static check is
 * tests/unit/browser-imports.test.ts: no "use client" module and nothing in src/shared reaches
 * src/server, and every module that imports the database, the queue or a secret imports this one.
 *
 * A local module rather than the npm package of the same name: that package throws unless the
 * resolver sets the "react-server" export condition, which Next.js sets for server code but
 * Vitest, tsx (the worker, the scripts) and plain Node do not, so every server module would fail
 * to load in tests and in the worker. This one throws only where there is a `window`.
 */
if (typeof window !== "undefined") {
  throw new Error(
    "A server-only module (it touches the database, the queue or secrets) was loaded in the browser. " +
      "Import what the browser needs from src/shared instead of src/server.",
  );
}

export {};
