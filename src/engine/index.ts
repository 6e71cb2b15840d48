// Public API of the analysis engine.
export * from "./types.ts";
export { analyzeCapture, ENGINE_VERSION, type PhaseResult } from "./analyze.ts";
export { spectrumForDisplay, realSpectrum, zoomSpectrum, findPeak, type DisplaySpectrum, type DisplaySpectrumOptions, type LineSpectrum, type Peak } from "./spectrum.ts";
export { synthCapture, mulberry32, type SynthOptions, type SynthTruth, type SynthResult, type SynthVibration } from "./synth.ts";
export * from "./formulas.ts";
export { gradeFromDepth, thomsonCondition, GRADE_BANDS, LIGHT_LOAD_PCT } from "./rotor.ts";
export { isoZone, isoBand, ZONE_LIMITS_MM_S } from "./vibration.ts";
export { realFft, complexFft, nextPow2 } from "./fft.ts";
export { makeWindow, coherentGain, enbwBins, scallopingLossDb } from "./windows.ts";
