// The group a fresh session starts in: the remembered one while still a member, else the first
// lab, else the personal group; and the cookie that remembers it.
import { describe, expect, it } from "vitest";
import { groupToStartIn, LAST_GROUP_COOKIE, rememberedGroup } from "../../../../src/components/shell/groupChoice";

describe("the last-used group", () => {
  it("starts in the remembered group while the person is still a member of it", () => {
    expect(groupToStartIn("org_b", ["org_a", "org_b"])).toBe("org_b");
    expect(groupToStartIn("personal", ["org_a", "org_b"])).toBeNull();
  });

  it("with nothing remembered, or a group left since, a lab member starts in their first lab; others in the personal group", () => {
    expect(groupToStartIn(undefined, ["org_a", "org_b"])).toBe("org_a");
    expect(groupToStartIn("org_gone", ["org_a"])).toBe("org_a");
    expect(groupToStartIn(undefined, [])).toBeNull();
    expect(groupToStartIn("org_gone", [])).toBeNull();
  });

  it("reads the cookie among others, decoded; no cookie or an empty one means nothing remembered", () => {
    expect(LAST_GROUP_COOKIE).toBe("triskel_group");
    expect(rememberedGroup(`theme=dark; triskel_group=org_demo_larkspur; other=1`)).toBe("org_demo_larkspur");
    expect(rememberedGroup(`triskel_group=personal`)).toBe("personal");
    expect(rememberedGroup(`triskel_group=org%20x`)).toBe("org x");
    expect(rememberedGroup(`theme=dark`)).toBeUndefined();
    expect(rememberedGroup(`triskel_group=`)).toBeUndefined();
    expect(rememberedGroup(`not_triskel_group=org_a`)).toBeUndefined();
  });
});
