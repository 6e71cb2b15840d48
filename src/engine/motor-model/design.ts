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
 * A mid-range value is used: actual motors differ by size and pole count.
 */
export const BREAKDOWN_TORQUE_RATIO: Record<DesignLetter, number> = { A: 2.5, B: 2.25, C: 2.1, D: 2.75, wound: 2.25 };

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
 * Typical starting (locked-rotor) current in multiples of full-load current, typical values from memory:
 * A 7.5 × (the table's "higher locked-rotor current"), B and C 6.5 ×, D 6.0 × (high-resistance rotor).
 */
export const LOCKED_ROTOR_CURRENT_RATIO: Record<Exclude<DesignLetter, "wound">, number> = { A: 7.5, B: 6.5, C: 6.5, D: 6.0 };
