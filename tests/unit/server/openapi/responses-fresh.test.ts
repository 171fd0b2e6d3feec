// The committed answer schemas (src/server/openapi/responses.generated.json) are what
// `npm run build:openapi` makes from the contract's TypeScript types today.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { generateResponses, RESPONSES_FILE, responsesText } from "../../../../scripts/build-openapi";
import { JSON_ROUTES } from "@/shared/api";

describe("generated answer schemas", () => {
  // The generator reads the whole type graph: 10-15 s on an idle 2-core machine, more under load.
  it("are up to date with src/shared/api (else: run npm run build:openapi)", { timeout: 180_000 }, () => {
    const fresh = generateResponses();
    expect(Object.keys(fresh.routes).sort()).toEqual([...JSON_ROUTES].sort());
    const committed = readFileSync(RESPONSES_FILE, "utf8");
    if (committed !== responsesText(fresh))
      expect.fail(
        "src/server/openapi/responses.generated.json is stale: the answer types in src/shared/api changed. Run npm run build:openapi and commit the file.",
      );
  });
});
