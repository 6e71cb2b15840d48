// The demo scenario: Northwend Utilities, an invented operator with a water-treatment works, a bulk-materials
// terminal and a booster station. Nameplates follow usual IEC (50 Hz, 400 V) and NEMA (60 Hz, 460 V) ratings for
// their duty. Everything here is invented for the demo; none of it is used by the tests' reference checks.

export interface ScenarioMotor {
  tag: string;
  name: string;
  area: string;
  drivenEquipment: "pump" | "fan" | "conveyor" | "compressor" | "blower" | "crusher" | "mixer";
  criticality: "low" | "medium" | "high";
  ratedKw: number;
  ratedVoltage: number;
  ratedCurrent: number;
  ratedHz: 50 | 60;
  ratedRpm: number;
  poles: number;
  rotorBars: number | null;
  statorSlots: number | null;
  designLetter?: string;
  efficiencyClass?: string;
  efficiencyPct: number;
  powerFactor: number;
  connection: "star" | "delta";
  driveFed?: boolean;
  machineGroup: 1 | 2;
  support: "rigid" | "flexible";
  /** The motor's part in the demo story. */
  story?: "rotor-fault" | "under-loaded" | "drive-fed" | "load-oscillation" | "imbalance";
  /** Typical running load, % of rated. */
  typicalLoadPct: number;
  vibration?: boolean;
  /** Rolling bearings on record (drive end, non-drive end). */
  bearings?: { de?: ScenarioBearing; nde?: ScenarioBearing };
}

/** A bearing as the motor register holds it: designation, Nb, d and D in mm, contact angle in degrees. */
export interface ScenarioBearing {
  designation: string;
  rollingElements: number;
  elementDiameterMm: number;
  pitchDiameterMm: number;
  contactAngleDeg: number;
}

export interface ScenarioSite {
  code: string;
  name: string;
  timezone: string;
  areas: string[];
  motors: ScenarioMotor[];
}

type Base = Omit<ScenarioMotor, "tag" | "name" | "area" | "drivenEquipment" | "criticality" | "typicalLoadPct">;

// Ratings used more than once.
const IEC: Record<string, Base> = {
  "2p-30": { ratedKw: 30, ratedVoltage: 400, ratedCurrent: 53.5, ratedHz: 50, ratedRpm: 2950, poles: 2, rotorBars: 28, statorSlots: 36, efficiencyClass: "IE3", efficiencyPct: 93.3, powerFactor: 0.88, connection: "delta", machineGroup: 2, support: "rigid" },
  "2p-55": { ratedKw: 55, ratedVoltage: 400, ratedCurrent: 96, ratedHz: 50, ratedRpm: 2970, poles: 2, rotorBars: 32, statorSlots: 36, efficiencyClass: "IE3", efficiencyPct: 94.3, powerFactor: 0.89, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-22": { ratedKw: 22, ratedVoltage: 400, ratedCurrent: 41, ratedHz: 50, ratedRpm: 1470, poles: 4, rotorBars: 28, statorSlots: 36, efficiencyClass: "IE3", efficiencyPct: 93.0, powerFactor: 0.84, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-45": { ratedKw: 45, ratedVoltage: 400, ratedCurrent: 82, ratedHz: 50, ratedRpm: 1480, poles: 4, rotorBars: 40, statorSlots: 48, efficiencyClass: "IE3", efficiencyPct: 94.2, powerFactor: 0.85, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-75": { ratedKw: 75, ratedVoltage: 400, ratedCurrent: 134, ratedHz: 50, ratedRpm: 1485, poles: 4, rotorBars: 40, statorSlots: 48, efficiencyClass: "IE3", efficiencyPct: 95.0, powerFactor: 0.86, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-160": { ratedKw: 160, ratedVoltage: 400, ratedCurrent: 280, ratedHz: 50, ratedRpm: 1488, poles: 4, rotorBars: 46, statorSlots: 60, efficiencyClass: "IE3", efficiencyPct: 95.8, powerFactor: 0.87, connection: "delta", machineGroup: 2, support: "rigid" },
  "6p-55": { ratedKw: 55, ratedVoltage: 400, ratedCurrent: 104, ratedHz: 50, ratedRpm: 988, poles: 6, rotorBars: 58, statorSlots: 72, efficiencyClass: "IE3", efficiencyPct: 94.6, powerFactor: 0.83, connection: "delta", machineGroup: 2, support: "flexible" },
  "8p-37": { ratedKw: 37, ratedVoltage: 400, ratedCurrent: 76, ratedHz: 50, ratedRpm: 738, poles: 8, rotorBars: 58, statorSlots: 72, efficiencyClass: "IE3", efficiencyPct: 93.4, powerFactor: 0.77, connection: "delta", machineGroup: 2, support: "flexible" },
};
const NEMA: Record<string, Base> = {
  "2p-40": { ratedKw: 30, ratedVoltage: 460, ratedCurrent: 45, ratedHz: 60, ratedRpm: 3545, poles: 2, rotorBars: 28, statorSlots: 36, designLetter: "B", efficiencyClass: "IE3", efficiencyPct: 93.0, powerFactor: 0.89, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-100": { ratedKw: 75, ratedVoltage: 460, ratedCurrent: 114, ratedHz: 60, ratedRpm: 1780, poles: 4, rotorBars: 40, statorSlots: 48, designLetter: "B", efficiencyClass: "IE3", efficiencyPct: 95.4, powerFactor: 0.86, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-150": { ratedKw: 110, ratedVoltage: 460, ratedCurrent: 168, ratedHz: 60, ratedRpm: 1785, poles: 4, rotorBars: 46, statorSlots: 60, designLetter: "C", efficiencyClass: "IE3", efficiencyPct: 95.8, powerFactor: 0.86, connection: "delta", machineGroup: 2, support: "rigid" },
  "4p-400": { ratedKw: 300, ratedVoltage: 460, ratedCurrent: 450, ratedHz: 60, ratedRpm: 1788, poles: 4, rotorBars: 52, statorSlots: 72, designLetter: "B", efficiencyClass: "IE3", efficiencyPct: 96.2, powerFactor: 0.88, connection: "delta", machineGroup: 2, support: "rigid" },
  "6p-60": { ratedKw: 45, ratedVoltage: 460, ratedCurrent: 72, ratedHz: 60, ratedRpm: 1185, poles: 6, rotorBars: 58, statorSlots: 72, designLetter: "B", efficiencyClass: "IE3", efficiencyPct: 94.5, powerFactor: 0.82, connection: "delta", machineGroup: 2, support: "flexible" },
  "8p-50": { ratedKw: 37, ratedVoltage: 460, ratedCurrent: 64, ratedHz: 60, ratedRpm: 885, poles: 8, rotorBars: 70, statorSlots: 72, designLetter: "C", efficiencyClass: "IE3", efficiencyPct: 93.6, powerFactor: 0.76, connection: "delta", machineGroup: 2, support: "flexible" },
};

// Deep-groove ball bearings of the sizes these frames usually carry (6200/6300 series, C3 clearance at the drive end).
// The geometry is invented but typical of the size: pitch diameter about the mean of bore and outside diameter,
// balls of a standard inch size, 8 in a 63xx and 10 in a 62xx; contact angle 0° (radial load).
const ball = (designation: string, rollingElements: number, elementDiameterMm: number, pitchDiameterMm: number): ScenarioBearing => ({ designation, rollingElements, elementDiameterMm, pitchDiameterMm, contactAngleDeg: 0 });
const BEARINGS = {
  "2p-30": { de: ball("6312 C3", 8, 22.225, 95), nde: ball("6212 C3", 10, 15.875, 85) },
  "2p-55": { de: ball("6314 C3", 8, 25.4, 110), nde: ball("6213 C3", 10, 16.669, 92.5) },
  "4p-100": { de: ball("6313 C3", 8, 23.813, 102.5), nde: ball("6213 C3", 10, 16.669, 92.5) },
  "4p-160": { de: ball("6319 C3", 8, 31.75, 147.5), nde: ball("6316 C3", 8, 26.988, 125) },
};

const m = (base: Base, rest: Omit<ScenarioMotor, keyof Base> & Partial<Pick<ScenarioMotor, "driveFed" | "story" | "vibration" | "bearings">>): ScenarioMotor => ({ ...base, ...rest });

export const SCENARIO: ScenarioSite[] = [
  {
    code: "TWT",
    name: "Tarnholm Water Treatment Works",
    timezone: "Europe/Berlin",
    areas: ["Raw Water Intake", "Filtration", "High-Lift Pumping", "Sludge Handling"],
    motors: [
      m(IEC["4p-160"], { tag: "TWT-INT-P01", name: "Intake pump 1", area: "Raw Water Intake", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 78, driveFed: true, story: "drive-fed", vibration: true }),
      m(IEC["4p-160"], { tag: "TWT-INT-P02", name: "Intake pump 2", area: "Raw Water Intake", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 82, vibration: true, bearings: BEARINGS["4p-160"] }),
      m(IEC["4p-22"], { tag: "TWT-INT-S01", name: "Band screen drive", area: "Raw Water Intake", drivenEquipment: "conveyor", criticality: "medium", typicalLoadPct: 64 }),
      m(IEC["2p-30"], { tag: "TWT-FIL-B01", name: "Air-scour blower 1", area: "Filtration", drivenEquipment: "blower", criticality: "medium", typicalLoadPct: 85, vibration: true, bearings: BEARINGS["2p-30"] }),
      m(IEC["2p-30"], { tag: "TWT-FIL-B02", name: "Air-scour blower 2", area: "Filtration", drivenEquipment: "blower", criticality: "medium", typicalLoadPct: 83 }),
      m(IEC["4p-45"], { tag: "TWT-FIL-P01", name: "Backwash pump 1", area: "Filtration", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 76 }),
      m(IEC["4p-45"], { tag: "TWT-FIL-P02", name: "Backwash pump 2", area: "Filtration", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 74 }),
      m(IEC["4p-160"], { tag: "TWT-HLP-P01", name: "High-lift pump 1", area: "High-Lift Pumping", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 88, vibration: true, bearings: BEARINGS["4p-160"] }),
      m(IEC["4p-160"], { tag: "TWT-HLP-P02", name: "High-lift pump 2", area: "High-Lift Pumping", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 86 }),
      m(IEC["4p-160"], { tag: "TWT-HLP-P03", name: "High-lift pump 3", area: "High-Lift Pumping", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 90, story: "rotor-fault", vibration: true }),
      m(IEC["2p-55"], { tag: "TWT-HLP-P04", name: "Wash-water pump", area: "High-Lift Pumping", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 71 }),
      m(IEC["6p-55"], { tag: "TWT-SLU-M01", name: "Thickener mixer", area: "Sludge Handling", drivenEquipment: "mixer", criticality: "low", typicalLoadPct: 62 }),
      m(IEC["8p-37"], { tag: "TWT-SLU-P01", name: "Sludge transfer pump", area: "Sludge Handling", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 70 }),
      m(IEC["4p-22"], { tag: "TWT-SLU-C01", name: "Cake conveyor", area: "Sludge Handling", drivenEquipment: "conveyor", criticality: "low", typicalLoadPct: 58 }),
      m(IEC["4p-75"], { tag: "TWT-SLU-F01", name: "Odour-control fan", area: "Sludge Handling", drivenEquipment: "fan", criticality: "medium", typicalLoadPct: 73 }),
    ],
  },
  {
    code: "GBT",
    name: "Greyquay Bulk Terminal",
    timezone: "America/Halifax",
    areas: ["Shiploader", "Conveyor Gallery", "Dust Control", "Compressor House"],
    motors: [
      m(NEMA["4p-400"], { tag: "GBT-SHL-L01", name: "Shiploader boom conveyor", area: "Shiploader", drivenEquipment: "conveyor", criticality: "high", typicalLoadPct: 80, vibration: true }),
      m(NEMA["4p-150"], { tag: "GBT-SHL-L02", name: "Shiploader shuttle drive", area: "Shiploader", drivenEquipment: "conveyor", criticality: "high", typicalLoadPct: 68 }),
      m(NEMA["8p-50"], { tag: "GBT-SHL-L03", name: "Luffing winch", area: "Shiploader", drivenEquipment: "conveyor", criticality: "medium", typicalLoadPct: 60 }),
      m(NEMA["4p-150"], { tag: "GBT-CNV-C05", name: "Gallery conveyor 5", area: "Conveyor Gallery", drivenEquipment: "conveyor", criticality: "high", typicalLoadPct: 84 }),
      m(NEMA["4p-150"], { tag: "GBT-CNV-C06", name: "Gallery conveyor 6", area: "Conveyor Gallery", drivenEquipment: "conveyor", criticality: "high", typicalLoadPct: 81 }),
      m(NEMA["4p-150"], { tag: "GBT-CNV-C07", name: "Gallery conveyor 7", area: "Conveyor Gallery", drivenEquipment: "conveyor", criticality: "high", typicalLoadPct: 87, story: "rotor-fault", vibration: true }),
      m(NEMA["4p-100"], { tag: "GBT-CNV-C08", name: "Transfer conveyor 8", area: "Conveyor Gallery", drivenEquipment: "conveyor", criticality: "medium", typicalLoadPct: 77 }),
      m(NEMA["6p-60"], { tag: "GBT-CNV-K01", name: "Lump crusher", area: "Conveyor Gallery", drivenEquipment: "crusher", criticality: "medium", typicalLoadPct: 72 }),
      m(NEMA["4p-100"], { tag: "GBT-DST-F01", name: "Baghouse fan 1", area: "Dust Control", drivenEquipment: "fan", criticality: "medium", typicalLoadPct: 79, story: "imbalance", vibration: true, bearings: BEARINGS["4p-100"] }),
      m(NEMA["4p-100"], { tag: "GBT-DST-F02", name: "Baghouse fan 2", area: "Dust Control", drivenEquipment: "fan", criticality: "medium", typicalLoadPct: 80 }),
      m(NEMA["2p-40"], { tag: "GBT-DST-P01", name: "Suppression water pump", area: "Dust Control", drivenEquipment: "pump", criticality: "low", typicalLoadPct: 66 }),
      m(NEMA["4p-150"], { tag: "GBT-CMP-K01", name: "Plant-air compressor 1", area: "Compressor House", drivenEquipment: "compressor", criticality: "high", typicalLoadPct: 83 }),
      m(NEMA["4p-150"], { tag: "GBT-CMP-K02", name: "Plant-air compressor 2 (reciprocating)", area: "Compressor House", drivenEquipment: "compressor", criticality: "high", typicalLoadPct: 82, story: "load-oscillation", vibration: true }),
      m(NEMA["2p-40"], { tag: "GBT-CMP-P01", name: "Cooling-water pump", area: "Compressor House", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 69 }),
    ],
  },
  {
    code: "KRB",
    name: "Kestrel Ridge Booster Station",
    timezone: "Europe/Berlin",
    areas: ["Pump Hall", "Ventilation"],
    motors: [
      m(IEC["2p-55"], { tag: "KRB-PMP-P01", name: "Booster pump 1", area: "Pump Hall", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 84, vibration: true, bearings: BEARINGS["2p-55"] }),
      m(IEC["2p-55"], { tag: "KRB-PMP-P02", name: "Booster pump 2", area: "Pump Hall", drivenEquipment: "pump", criticality: "high", typicalLoadPct: 81 }),
      m(IEC["2p-55"], { tag: "KRB-PMP-P03", name: "Booster pump 3 (standby)", area: "Pump Hall", drivenEquipment: "pump", criticality: "medium", typicalLoadPct: 79 }),
      m(IEC["4p-22"], { tag: "KRB-PMP-D01", name: "Drainage pump", area: "Pump Hall", drivenEquipment: "pump", criticality: "low", typicalLoadPct: 63 }),
      m(IEC["4p-45"], { tag: "KRB-VNT-F01", name: "Hall supply fan", area: "Ventilation", drivenEquipment: "fan", criticality: "medium", typicalLoadPct: 72 }),
      m(IEC["4p-75"], { tag: "KRB-VNT-F02", name: "Hall extract fan", area: "Ventilation", drivenEquipment: "fan", criticality: "medium", typicalLoadPct: 31, story: "under-loaded", vibration: true }),
    ],
  },
];
