// Marker families of the engine (Marker.family) → key, name and stroke. Each family has its own dash pattern as
// well as its own colour, and every marker carries its text label, so nothing relies on colour alone. The key
// toggles the family in the spectrum view (its key help, "?", lists them from here); the view's own keys are
// a (around supply), f (full range), + − ← → Esc ?, so a family takes a letter none of those use.

export interface MarkerFamily {
  family: string;
  key: string;
  label: string;
  color: string;
  dash: number[];
}

export const MARKER_FAMILIES: MarkerFamily[] = [
  { family: "supply", key: "s", label: "Supply f", color: "#1c1e20", dash: [] },
  { family: "broken-bar", key: "b", label: "Broken-bar sidebands (1 ± 2ks)·f", color: "#b13a1b", dash: [7, 3] },
  { family: "eccentricity", key: "e", label: "Eccentricity f ± k·fr", color: "#0d6a6c", dash: [2, 3] },
  { family: "slot", key: "r", label: "Rotor slot harmonics", color: "#6247a0", dash: [9, 3, 2, 3] },
  { family: "harmonic", key: "h", label: "Supply harmonics n·f", color: "#6f7277", dash: [1, 2] },
  { family: "vibration", key: "v", label: "Vibration: 1×, 2×LF, pole pass", color: "#2d6a3b", dash: [5, 2] },
  { family: "bearing", key: "d", label: "Bearing defects: FTF, BPFO, BPFI, BSF", color: "#8a5a00", dash: [4, 2, 1, 2] },
];

const FALLBACK: MarkerFamily = { family: "other", key: "", label: "Other", color: "#85888c", dash: [3, 3] };

export function familyStyle(family: string): MarkerFamily {
  return MARKER_FAMILIES.find((f) => f.family === family) ?? { ...FALLBACK, family };
}

export function familyForKey(key: string): MarkerFamily | undefined {
  return MARKER_FAMILIES.find((f) => f.key === key.toLowerCase());
}
