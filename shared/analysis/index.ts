/**
 * Public API of the Overtone analysis library (issue 6): polarisation-resolved patterns predicted
 * from the engine's bulk tensors, fits that find the crystal axes, and harmonic peaks in spectra.
 * Import only from here. Pure TypeScript, deterministic, no I/O; depends on `shared/engine` and
 * `ml-levenberg-marquardt`. Angles in degrees, wavelengths in nm, intensities in the file's units.
 */
export { AnalysisError } from './errors'
export type { AnalysisErrorCode, AnalysisErrorInit } from './errors'
export { parseTable, parseCell, MAX_TABLE_ROWS, MAX_TABLE_CHARS } from './csv'
export type { ParsedTable, ParseTableOptions, Separator, SkippedRow } from './csv'
export { readSweep, readSweepText, chooseUnit } from './sweep'
export type { Analyser, PolarSweep, SweepChannel, ReadSweepOptions } from './sweep'
export {
  PATTERN_ASSUMPTIONS,
  describePatternBasis,
  buildLabTensor,
  rotateAboutNormal,
  inducedPolarization,
  predictPattern,
} from './patterns'
export type { PatternModel, PatternPoint, PatternBasis } from './patterns'
export { fitPolarSweep } from './fit'
export type { FitOptions, Estimate, FittedRatio, FitResidual, SymmetryCheck, PolarFitResult } from './fit'
export { findDominantHarmonic } from './symmetry'
export type { HarmonicAnalysis } from './symmetry'
export { readSpectrum, readSpectrumText, findHarmonicPeak } from './spectrum'
export type { Spectrum, ReadSpectrumOptions, HarmonicPeakOptions, HarmonicPeak } from './spectrum'
export { flagHarmonicPeak } from './flags'
export type { AnalysisFlag } from './flags'
