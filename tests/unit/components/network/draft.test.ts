// Switching the editor's lattice keeps what still applies and gives the engine's schema a network
// it accepts (src/components/network/draft.ts).
import { describe, expect, it } from "vitest";
import { networkSchema, periodFromTwistNm } from "@/engine/browser";
import { switchLattice } from "@/components/network/draft";
import { triangularNetwork } from "@/shared/networks";

describe("switching lattice in the editor", () => {
  const tri = {
    ...triangularNetwork(
      { columns: 14, rows: 6 },
      { forward: 0.5, left: 0.3, right: 0.2 },
      { transverse: "open", disorder: { linkPhaseWidthRad: 1.5, seed: 9 } },
    ),
    modeVelocityMps: 4e5,
    channelsPerLink: 2 as const,
    degeneracy: { spin: 1 as const, valley: 2 as const },
  };
  it("triangular to square keeps size, edges, velocity, spin, disorder and the link length; drops twist, channels and valleys", () => {
    const sq = switchLattice(tri, "square");
    expect(sq.lattice).toBe("square");
    expect(sq.size).toEqual({ columns: 14, rows: 6 });
    expect(sq.transverse).toBe("open");
    expect(sq.modeVelocityMps).toBe(4e5);
    expect(sq.disorder).toEqual({ linkPhaseWidthRad: 1.5, seed: 9 });
    expect(sq.degeneracy).toEqual({ spin: 1, valley: 1 });
    expect(sq.twistDegrees).toBeUndefined();
    expect(sq.periodNm).toBe(Number(periodFromTwistNm(0.11).toFixed(2)));
    expect(sq.channelsPerLink).toBe(1);
    expect(sq.node).toEqual({ turning: 0.5 });
    expect(networkSchema.safeParse(sq).success).toBe(true);
  });
  it("and back: a triangular network with the square one's period, the default node and two valleys", () => {
    const back = switchLattice(switchLattice(tri, "square"), "triangular");
    expect(back.lattice).toBe("triangular");
    expect(back.size).toEqual({ columns: 14, rows: 6 });
    expect(back.periodNm).toBe(Number(periodFromTwistNm(0.11).toFixed(2)));
    expect(back.twistDegrees).toBeUndefined();
    expect(back.degeneracy).toEqual({ spin: 1, valley: 2 });
    expect(back.node).toMatchObject({ forward: 0.5, left: 0.25, right: 0.25 });
    expect(networkSchema.safeParse(back).success).toBe(true);
    expect(switchLattice(tri, "triangular")).toBe(tri);
  });
});
