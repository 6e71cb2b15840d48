// The textbook worked example the motor-model tests check against: S. J. Chapman, Electric Machinery
// Fundamentals, 4th ed., Example 7-5 (and 7-6): 460 V, 25 hp, 60 Hz, 4-pole, Y-connected; R1 0.641, R2 0.332,
// X1 1.106, X2 0.464, XM 26.3 Ω per phase; friction, windage and core losses 1100 W (core loss lumped in).
import type { MotorModelInput } from "../../src/engine/motor-model/types.ts";

export const chapman: MotorModelInput = {
  lineVoltage: 460,
  frequencyHz: 60,
  poles: 4,
  connection: "star",
  params: { r1: 0.641, x1: 1.106, r2: 0.332, x2: 0.464, xm: 26.3 },
  rotationalLossW: 1100,
};
