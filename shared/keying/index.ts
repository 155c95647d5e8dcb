/**
 * The keying engine: pinning charts, key checks, progression, system audit and tray.
 * Pure TypeScript so the tablet computes offline exactly what the server computes.
 */
export type { ChamberPinning, CoreKeys, CorePinning, PinningIssue, Profile, Severity } from './types';
export { systemAuditFindingCodes, keyingIssueCodes } from './codes';
export type { SystemAuditFindingCode, KeyingIssueCode } from './codes';
export { KeyingError, hasErrors } from './errors';
export { builtInProfiles, chambersBackToFront } from './profiles';
export { validateProfile } from './validateProfile';
export { adjacentCutRange, chamberRange, depthRange, partSizeRange, sleeveRange, stackRange, stepRange, stockedSizesRange, waferRange } from './limits';
export type { Range } from './limits';
export type { ProfileProblem } from './validateProfile';
export { formatBitting, parseBitting, readBitting } from './bitting';
export type { BittingReading } from './bitting';
export { pinCore } from './pinCore';
export { buildUpSeam, controlDepthMask, keyOperates } from './keyOperates';
export { keyExposure } from './keyExposure';
export type { CoreExposure, ExposureCore, ExposureHow, ExposureInput, ExposureKey } from './keyExposure';
export { maxProgressionWithoutLimit, progressKeys, progressionMethods } from './progressKeys';
export type { ProgressOptions, ProgressionMethod } from './progressKeys';
export { checkKeyPlacement, masterConstantChambers, placementChecker } from './placement';
export type { KeyPlacement, PlacedKey, PlacementCheck, PlacementProblem, PlacementSystem } from './placement';
export { partKinds, trayFor } from './tray';
export type { PartCounts, PartKind, SizeCount, Tray, TrayChamber, TwoWaferBuildUp } from './tray';
export * from './systemAudit';
