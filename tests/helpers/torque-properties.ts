// The torque–slip properties every circuit form must have (single cage and deep bar), as fast-check properties:
// zero at synchronous speed, positive while motoring, largest at the breakdown slip the model reports.
import { it } from "vitest";
import fc from "fast-check";
import { breakdownSlip, evaluateAtSlip, type MotorModelInput } from "../../src/engine/motor-model/index.ts";

export const motoringSlip = fc.double({ min: 1e-6, max: 1, noNaN: true });

export function torqueSlipProperties(circuit: fc.Arbitrary<MotorModelInput>): void {
  it("induced torque is zero at synchronous speed", () => {
    fc.assert(fc.property(circuit, (input) => evaluateAtSlip(input, 0).inducedTorqueNm === 0));
  });

  it("induced torque is positive for 0 < s ≤ 1 (motoring)", () => {
    fc.assert(fc.property(circuit, motoringSlip, (input, s) => evaluateAtSlip(input, s).inducedTorqueNm > 0));
  });

  it("torque is largest at the numerically found breakdown slip", () => {
    fc.assert(
      fc.property(circuit, motoringSlip, (input, s) => {
        const sb = breakdownSlip(input);
        return evaluateAtSlip(input, s).inducedTorqueNm <= evaluateAtSlip(input, sb).inducedTorqueNm * (1 + 1e-9);
      }),
    );
  });
}
