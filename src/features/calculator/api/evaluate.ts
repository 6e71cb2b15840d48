// POST /api/motor-model/evaluate (server/routes/motor-model.ts): without slip → curves and key points;
// with slip → the operating point and its flags. The form's zod schema sits beside the call.
import { useMutation } from "@tanstack/react-query";
import { z } from "zod";
import { apiPost } from "../../../lib/api.ts";
import type { KeyPoints, MotorCurves } from "../../../engine/motor-model/index.ts";
import type { ModelFlag, OperatingPoint } from "../../../engine/motor-model/types.ts";

const required = (label: string, rule: (n: z.ZodNumber) => z.ZodNumber) =>
  z
    .string()
    .trim()
    .min(1, `Enter ${label}`)
    .transform((s) => Number(s.replace(",", ".")))
    .pipe(rule(z.number({ message: `${label} must be a number` }).finite(`${label} must be a number`)));
const optional = (label: string, rule: (n: z.ZodNumber) => z.ZodNumber) =>
  z
    .string()
    .trim()
    .transform((s) => (s === "" ? undefined : Number(s.replace(",", "."))))
    .pipe(rule(z.number({ message: `${label} must be a number` }).finite(`${label} must be a number`)).optional());

export const calculatorSchema = z.object({
  lineVoltage: required("the line voltage", (n) => n.positive("Must be above 0 V")),
  frequencyHz: required("the frequency", (n) => n.positive("Must be above 0 Hz")),
  poles: required("the poles", (n) => n.int("Whole number").min(2, "At least 2").max(120, "At most 120")).refine((p) => p % 2 === 0, "Poles come in pairs: an even number"),
  connection: z.enum(["star", "delta"]),
  r1: required("R1", (n) => n.nonnegative("Must be ≥ 0 Ω")),
  x1: required("X1", (n) => n.nonnegative("Must be ≥ 0 Ω")),
  r2: required("R2", (n) => n.positive("Must be above 0 Ω")),
  x2: required("X2", (n) => n.nonnegative("Must be ≥ 0 Ω")),
  xm: required("Xm", (n) => n.positive("Must be above 0 Ω")),
  rc: optional("Rc", (n) => n.positive("Must be above 0 Ω")),
  rotationalLossW: optional("the rotational losses", (n) => n.nonnegative("Must be ≥ 0 W")),
  slip: optional("the slip", (n) => n.min(-1, "At least −1").max(2, "At most 2")),
});
export type CalculatorValues = z.input<typeof calculatorSchema>;
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
      const body = { ...rest, rc: rest.rc ?? undefined, points: 200 };
      const [curves, point] = await Promise.all([
        apiPost<CurvesResult>("/motor-model/evaluate", body),
        slip === undefined ? Promise.resolve(null) : apiPost<PointResult>("/motor-model/evaluate", { ...body, slip }),
      ]);
      return { curves, point, input };
    },
  });
}
