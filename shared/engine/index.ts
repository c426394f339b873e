/**
 * Public API of the Overtone harmonic-channel engine. Import only from here.
 * Pure TypeScript: deterministic, no I/O. Frames, units and sources are stated on every export.
 */
export { ENGINE_VERSION } from './version'
export { EngineError } from './errors'
export type { EngineErrorCode, EngineErrorInit } from './errors'

export type { Vec3, Mat3 } from './linalg'
export type { CrystalSystem } from './data/generators'
export { POINT_GROUP_SYMBOLS, getPointGroup, closeGroup, normalizePointGroupSymbol } from './point-groups'
export type { PointGroup } from './point-groups'

export type { PermutationSymmetry } from './tensor-space'
export { transformTensor, indexLabel, flatIndex } from './tensor-space'
export { solveTensorForm, solveInvariantSubspace, MIN_ORDER, MAX_ORDER } from './tensor-forms'
export type { TensorForm, TensorFormOptions } from './tensor-forms'
export { toVoigt, formDMatrix, describeDMatrixEqualities, countNonZeroVoigt, voigtName } from './voigt'
export type { SymbolicEntry } from './voigt'

export { parseDirection, formatDirection } from './directions'
export type { DirectionInput } from './directions'
export { labFrame, rotateToSample } from './cut-rotation'
export type { CutOrientation } from './cut-rotation'
export { computeCylindricalContent } from './cylindrical-content'
export type { CylindricalContent } from './cylindrical-content'
export { computeMirrorParity, verticalMirror } from './mirror-parity'
export type { Parity } from './mirror-parity'
export { prepareSampleTensor, sampleParity } from './sample-tensor'
export type { SampleTensor, SampleTensorInput } from './sample-tensor'

export {
  shapeSymmetry,
  latticeSymmetry,
  deriveArraySymmetry,
  intersectStructures,
  rotateStructure,
  closeStructure,
  structureGroupName,
  normalizeMirror,
  generatedRotationOrder,
  checkStructureSymmetry,
  SHAPE_KINDS,
  LATTICE_KINDS,
} from './structure'
export type { StructureSymmetry, ShapeSpec, ShapeKind, LatticeSpec, LatticeKind } from './structure'
export { pumpProjections, pumpParity, describePump, describeCircularHandedness, isSameMirror, PUMP_TYPES } from './pump'
export type { PumpSpec, CircularHandedness } from './pump'
export { parsePump } from './pump-request'

export {
  sumProjections,
  findAllowedHarmonics,
  harmonicParity,
  findNormalEmission,
  findAllowedMultipoles,
} from './selection-rules'
export type { AllowedMInput, NormalEmission, Multipole } from './selection-rules'
export { describeCut, explainSample, explainRules } from './explain'
export { parseChannelRequest, CHANNEL_DEFAULTS } from './request'
export type { ChannelRequest } from './request'
export { computeChannels, evaluateChannels } from './channels'
export type { ChannelResponse, MirrorParityEntry } from './channels'
export { planFabrication } from './planner'
export type { PlanOption, WantedEmission } from './planner'
export { predictPolarPattern } from './polar-pattern'
export { clearEngineCaches } from './caches'
export type { PolarPoint } from './polar-pattern'
export {
  predictObliquePattern,
  obliqueFields,
  fresnelCrossing,
  fourierAmplitudes,
  significantOrders,
  FOURIER_SAMPLES,
} from './oblique-pattern'
export type { Complex, Detection, ObliqueGeometry, ObliqueFields, FresnelCrossing } from './oblique-pattern'
export {
  computePolar,
  evaluatePolar,
  parsePolarRequest,
  polarSampleTensor,
  polarAzimuths,
  POLAR_DEFAULTS,
} from './polar'
export type { PolarRequest, PolarResponse, PolarPatternPoint } from './polar'
