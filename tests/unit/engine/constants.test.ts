import { describe, expect, it } from "vitest";
import * as K from "@/engine/constants";

describe("check 1: constants from the exact SI values", () => {
  // Source: SI 2019 redefinition, CODATA 2018: e = 1.602176634e-19 C and h = 6.62607015e-34 J s exact.
  it("e^2/h = 3.874045865e-5 S, h/e^2 = 25812.80745 ohm, h/e = 4.135667696e-15 Wb", () => {
    expect(K.ELEMENTARY_CHARGE_C).toBe(1.602176634e-19);
    expect(K.PLANCK_JS).toBe(6.62607015e-34);
    expect(K.CONDUCTANCE_QUANTUM_S).toBeCloseTo(3.874045865e-5, 14);
    expect(Math.abs(K.RESISTANCE_QUANTUM_OHM - 25812.80745) / 25812.80745).toBeLessThan(1e-9);
    expect(Math.abs(K.FLUX_QUANTUM_WB - 4.135667696e-15) / 4.135667696e-15).toBeLessThan(1e-9);
    expect(K.HBAR_JS * 2 * Math.PI).toBe(K.PLANCK_JS);
  });
  // Source: physics.md section 4, l = a / (2 sin(theta/2)) with a = 0.246 nm (derived).
  it("twist angle to period: 0.1 degree gives about 141 nm, and back", () => {
    expect(K.periodFromTwistNm(0.1)).toBeCloseTo(140.96, 1);
    expect(K.twistFromPeriodDegrees(K.periodFromTwistNm(0.37))).toBeCloseTo(0.37, 12);
  });
  it("energy period 2 pi hbar v / l", () => {
    // hbar v / l for v = 1e6 m/s, l = 100 nm: 1.054571817e-34 * 1e6 / 1e-7 J = 6.5821 meV (derived)
    expect(K.energyScaleMeV(100, 1e6)).toBeCloseTo(6.582119569, 8);
    expect(K.energyPeriodMeV(100, 1e6)).toBeCloseTo(2 * Math.PI * 6.582119569, 7);
  });
});
