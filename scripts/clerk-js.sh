#!/usr/bin/env bash
# Copies the clerk-js browser bundle from node_modules into public/clerk/ (ignored by git), so the
# app serves it itself (NEXT_PUBLIC_CLERK_JS_URL=/clerk/clerk.browser.js) and no CDN is needed.
set -euo pipefail
ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
SRC="$ROOT/node_modules/@clerk/clerk-js/dist"
DEST="$ROOT/public/clerk"
[ -f "$SRC/clerk.browser.js" ] || { echo "[triskel] @clerk/clerk-js is not installed (npm install)" >&2; exit 1; }
if [ -f "$DEST/clerk.browser.js" ] && [ ! "$SRC/clerk.browser.js" -nt "$DEST/clerk.browser.js" ]; then exit 0; fi
mkdir -p "$DEST"
# Only the browser build and its chunks (no source maps, no native/legacy builds).
find "$SRC" -maxdepth 1 -type f -name '*.js' ! -name '*native*' ! -name '*legacy*' ! -name 'clerk.js' ! -name 'clerk.no-rhc.js' -exec cp -p {} "$DEST/" \;
