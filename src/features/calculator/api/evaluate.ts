// POST /api/motor-model/evaluate (server/routes/motor-model.ts): without slip → curves and key points;
// with slip → the operating point and its flags. The form's zod schema (the server's, over text inputs) sits beside the call.
import { useMutation } from "@tanstack/react-query";
import { z } from "zod";
import { apiPost } from "../../../lib/api.ts";
import { numberInput } from "../../../lib/forms.ts";
import { flatEvaluateBody } from "../../../shared/schemas/motor-model.ts";
import type { KeyPoints, MotorCurves } from "../../../engine/motor-model/index.ts";
import type { ModelFlag, OperatingPoint } from "../../../engine/motor-model/types.ts";

const rules = flatEvaluateBody.shape;
/** The calculator form: the server's POST /evaluate rules (src/shared/schemas/motor-model.ts) over text inputs. */
export const calculatorSchema = z.object({
  lineVoltage: numberInput(rules.lineVoltage),
  frequencyHz: numberInput(rules.frequencyHz),
  poles: numberInput(rules.poles),
  connection: rules.connection,
  r1: numberInput(rules.r1),
  x1: numberInput(rules.x1),
  r2: numberInput(rules.r2),
  x2: numberInput(rules.x2),
  xm: numberInput(rules.xm),
  rc: numberInput(rules.rc),
  rotorLockedR2: numberInput(rules.rotorLockedR2),
  rotorLockedX2: numberInput(rules.rotorLockedX2),
  rotationalLossW: numberInput(rules.rotationalLossW),
  slip: numberInput(rules.slip),
});
type NumberField = Exclude<keyof z.output<typeof calculatorSchema>, "connection">;
/** The form's values: what the inputs hold. */
export type CalculatorValues = Record<NumberField, string> & { connection: "star" | "delta" };
export type CalculatorInput = z.output<typeof calculatorSchema>;

/** A motor to start from (460 V, 60 Hz, 4-pole, star, about 19 kW), so the screen shows results at once. */
export const EXAMPLE: CalculatorValues = {
  lineVoltage: "460",
  frequencyHz: "60",
  poles: "4",
  connection: "star",
  r1: "0.641",
  x1: "1.106",
  r2: "0.332",
  x2: "0.464",
  xm: "26.3",
  rc: "",
  rotorLockedR2: "",
  rotorLockedX2: "",
  rotationalLossW: "1100",
  slip: "0.022",
};

export interface CurvesResult {
  curves: MotorCurves;
  start: KeyPoints["start"];
  pullUp: KeyPoints["pullUp"];
  breakdown: KeyPoints["breakdown"];
  thevenin: KeyPoints["thevenin"];
}
export type PointResult = OperatingPoint & { flags: ModelFlag[] };

export interface CalculatorResult {
  curves: CurvesResult;
  point: PointResult | null;
  input: CalculatorInput;
}

/** Curves always; the operating point too when a slip is given (two calls of the same endpoint). */
export function useEvaluate() {
  return useMutation({
    mutationFn: async (input: CalculatorInput): Promise<CalculatorResult> => {
      const { slip, ...rest } = input;
      const body = { ...rest, rc: rest.rc ?? undefined, rotorLockedR2: rest.rotorLockedR2 ?? undefined, rotorLockedX2: rest.rotorLockedX2 ?? undefined, points: 200 };
      const [curves, point] = await Promise.all([
        apiPost<CurvesResult>("/motor-model/evaluate", body),
        slip === undefined ? Promise.resolve(null) : apiPost<PointResult>("/motor-model/evaluate", { ...body, slip }),
      ]);
      return { curves, point, input };
    },
  });
}
