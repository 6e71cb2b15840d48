// Rules of thumb by design letter, used where a test or the nameplate does not fix a value.

import type { DesignLetter } from "./types.ts";

/**
 * Share of the locked-rotor leakage reactance given to the stator, X1 / (X1 + X2), per the empirical
 * split of the standard test method for polyphase induction motors (IEEE Std 112 style):
 * A 0.5, B 0.4, C 0.3, D 0.5, wound rotor 0.5. Textbook table, quoted from memory.
 */
export const STATOR_LEAKAGE_SHARE: Record<DesignLetter, number> = { A: 0.5, B: 0.4, C: 0.3, D: 0.5, wound: 0.5 };

/**
 * Typical breakdown torque in multiples of full-load torque, inside the ranges of the NEMA design table
 * (A and B 175–300 %, C 190–225 %; D is specified by its 275 % locked-rotor torque, its peak sits near standstill).
 * A mid-range value is used: actual motors differ by size and pole count. These are the values from 15 kW up;
 * `typicalBreakdownTorqueRatio` raises A and B towards small motors.
 */
export const BREAKDOWN_TORQUE_RATIO: Record<DesignLetter, number> = { A: 2.5, B: 2.25, C: 2.1, D: 2.75, wound: 2.25 };

/**
 * Typical breakdown torque for a rated output. The design table's footnote says the higher values of its ranges
 * belong to the smaller ratings (EASA Engineering Handbook, after NEMA MG 10 Table 2-1): A and B rise log-linearly
 * in kW from their `BREAKDOWN_TORQUE_RATIO` value at 15 kW and above to the table's 300 % at 1 kW and below (a
 * rule of thumb; the end points are a choice, not a table). C, D and wound rotors keep their single value.
 */
export function typicalBreakdownTorqueRatio(design: DesignLetter, ratedKw: number): number {
  const large = BREAKDOWN_TORQUE_RATIO[design];
  if (design !== "A" && design !== "B") return large;
  const small = 3.0;
  if (ratedKw >= 15) return large;
  if (ratedKw <= 1) return small;
  return small + ((large - small) * Math.log(ratedKw)) / Math.log(15);
}

/**
 * Typical full-load efficiency by rated output when the nameplate gives none (rule of thumb,
 * roughly between the IE2 and IE3 levels for 4-pole 50 Hz motors). Linear in log(kW) between rows.
 */
const TYPICAL_EFFICIENCY: ReadonlyArray<readonly [kw: number, eta: number]> = [
  [0.75, 0.8],
  [1.5, 0.835],
  [4, 0.87],
  [11, 0.9],
  [22, 0.92],
  [45, 0.935],
  [75, 0.945],
  [160, 0.955],
  [375, 0.96],
];

export function typicalEfficiency(ratedKw: number): number {
  const rows = TYPICAL_EFFICIENCY;
  if (ratedKw <= rows[0][0]) return rows[0][1];
  if (ratedKw >= rows[rows.length - 1][0]) return rows[rows.length - 1][1];
  for (let i = 1; i < rows.length; i++) {
    const [k1, e1] = rows[i];
    const [k0, e0] = rows[i - 1];
    if (ratedKw <= k1) return e0 + ((e1 - e0) * Math.log(ratedKw / k0)) / Math.log(k1 / k0);
  }
  return rows[rows.length - 1][1];
}

/**
 * Split of the full-load losses used by the nameplate estimate (trade rule of thumb for TEFC motors:
 * stator copper ≈ 35–40 %, rotor copper 15–20 %, core 15–20 %, friction and windage 5–10 %, stray load 10–15 %).
 * Rotor copper loss is not assumed: it follows from the rated slip (P_rcl = s·P_ag). Stator copper takes the rest.
 */
export const LOSS_SHARE = { core: 0.2, rotational: 0.2, statorCopperMin: 0.15 } as const;

/**
 * Typical starting (locked-rotor) torque in multiples of full-load torque, typical values from memory inside the
 * NEMA design table (A and B 70–275 % by size, C 200–250 %, D 275 %): A and B 1.5 × up to 75 kW and 1.3 × above
 * (large motors start with less torque per unit; NEMA MG 1 sets minimums by size), C 2.0 × (the bottom of its
 * range, so its running peak, 2.1 ×, stays the highest torque), D 2.75 ×. Wound rotors are not given one: they
 * start on external resistance and have no deep bars.
 */
export function typicalLockedRotorTorqueRatio(design: DesignLetter, ratedKw: number): number | null {
  switch (design) {
    case "A":
    case "B":
      return ratedKw > 75 ? 1.3 : 1.5;
    case "C":
      return 2.0;
    case "D":
      return 2.75;
    case "wound":
      return null;
  }
}

/**
 * Typical starting (locked-rotor) current in multiples of full-load current, typical values from memory inside the
 * design table's 600–700 % (EASA Engineering Handbook, after NEMA MG 10 Table 2-1): A 7.5 × (the table's note: a
 * variation of B "having higher locked-rotor current"), B and C 6.5 ×, D 6.0 × (high-resistance rotor).
 */
export const LOCKED_ROTOR_CURRENT_RATIO: Record<Exclude<DesignLetter, "wound">, number> = { A: 7.5, B: 6.5, C: 6.5, D: 6.0 };

/**
 * NEMA MG 1 ¶12.35.1: maximum locked-rotor current of 60 Hz design B, C and D motors, in amperes at 230 V, by rated
 * horsepower (the table as reproduced in the EASA Engineering Handbook); other voltages inversely proportional.
 */
const NEMA_MAX_LOCKED_ROTOR_A_230V: ReadonlyArray<readonly [hp: number, amps: number]> = [
  [0.5, 20], [0.75, 25], [1, 30], [1.5, 40], [2, 50], [3, 64], [5, 92], [7.5, 127], [10, 162], [15, 232], [20, 290],
  [25, 365], [30, 435], [40, 580], [50, 725], [60, 870], [75, 1085], [100, 1450], [125, 1815], [150, 2170], [200, 2900],
  [250, 3650], [300, 4400], [350, 5100], [400, 5800], [450, 6500], [500, 7250],
];

/**
 * The NEMA MG 1 ¶12.35.1 maximum locked-rotor current for a rated output and voltage, A; between the table's
 * ratings linear in horsepower (our choice: the standard lists only the ratings). Null outside ½–500 hp.
 */
export function nemaMaxLockedRotorCurrentA(ratedKw: number, ratedVoltage: number): number | null {
  const hp = ratedKw / 0.7457;
  const rows = NEMA_MAX_LOCKED_ROTOR_A_230V;
  if (!(hp >= rows[0][0] && hp <= rows[rows.length - 1][0]) || !(ratedVoltage > 0)) return null;
  let i = 1;
  while (rows[i][0] < hp) i++;
  const [h0, a0] = rows[i - 1];
  const [h1, a1] = rows[i];
  return ((a0 + ((a1 - a0) * (hp - h0)) / (h1 - h0)) * 230) / ratedVoltage;
}

/**
 * The starting current the nameplate estimate aims for, in multiples of rated current: `LOCKED_ROTOR_CURRENT_RATIO`,
 * but for a 60 Hz design B, C or D motor never above the NEMA MG 1 ¶12.35.1 maximum for its rating (a NEMA motor
 * may not draw more; design A is the variation allowed higher current). Null for a wound rotor.
 */
export function typicalLockedRotorCurrentRatio(
  design: DesignLetter,
  np: { ratedKw: number; ratedVoltage: number; ratedCurrent: number; frequencyHz: number },
): { ratio: number; nemaMaxA: number | null } | null {
  if (design === "wound") return null;
  const typical = LOCKED_ROTOR_CURRENT_RATIO[design];
  const nemaMaxA = design !== "A" && np.frequencyHz === 60 ? nemaMaxLockedRotorCurrentA(np.ratedKw, np.ratedVoltage) : null;
  return { ratio: nemaMaxA === null ? typical : Math.min(typical, nemaMaxA / np.ratedCurrent), nemaMaxA };
}
