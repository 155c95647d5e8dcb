/**
 * Every code the keying engine can report, with what it means in shop words. The UI and
 * the server look messages up here so a code always reads the same wherever it shows.
 */
import { adjacentCutRange, chamberRange, depthRange, partSizeRange, sleeveRange, stackRange, stepRange, stockedSizesRange, waferRange } from './limits';

export const keyingIssueCodes = {
  // Reading a bitting (parseBitting throws these; pinCore reports them as errors).
  'bitting-length': { severity: 'error', meaning: 'The bitting has the wrong number of cuts for this profile.' },
  'bitting-not-digit': { severity: 'error', meaning: 'The bitting holds something other than a digit.' },
  'depth-out-of-range': { severity: 'error', meaning: 'A cut is deeper or shallower than the profile allows.' },
  // Building a chart.
  'no-operating-keys': { severity: 'error', meaning: 'No key was given that must turn the plug.' },
  'wafer-too-thin': { severity: 'error', meaning: 'A wafer would be thinner than the thinnest one the profile trusts.' },
  'size-not-stocked': { severity: 'error', meaning: 'A part size is not stocked and cannot be made from two stocked wafers.' },
  'stack-mismatch': { severity: 'error', meaning: 'A chamber’s parts do not add up to the stack height.' },
  'control-equals-operating': { severity: 'error', meaning: 'The control key is also listed as an operating key; it would release the core.' },
  'control-turns-plug': { severity: 'error', meaning: 'The control key lines up the operating shear line in every chamber; it would turn the plug.' },
  'operating-releases-core': { severity: 'error', meaning: 'An operating key lines up the control shear line in every chamber; it would release the core.' },
  'control-opens-more': { severity: 'warning', meaning: 'More bittings than the control key release the core: a two-wafer seam meets the control shear line.' },
  'control-shares-top-master': { severity: 'warning', meaning: 'The control key has the top master’s depth in some chamber.' },
  'parity-broken': { severity: 'warning', meaning: 'Depths in one chamber do not keep one parity under a two-step profile.' },
  'macs-exceeded': { severity: 'error', meaning: 'Two neighbouring cuts on one key differ by more than the profile’s maximum adjacent cut; the key cannot be cut.' },
  'key-parity': { severity: 'warning', meaning: 'An operating key does not keep the named top master’s parity in some chamber.' },
  // Placing a key in the hierarchy (checkKeyPlacement): entry, import and progression refuse these.
  'placement-unknown-master': { severity: 'error', meaning: 'The master a key hangs under is not in the key system.' },
  'placement-master-constant': { severity: 'error', meaning: 'A key under a master changes a position its master holds constant.' },
  'placement-parity': { severity: 'error', meaning: 'A key does not keep the top master’s parity in some position.' },
  'placement-equals-control': { severity: 'error', meaning: 'A key has the control key’s bitting.' },
  'placement-equals-master': { severity: 'error', meaning: 'A key has its own master’s bitting.' },
  'placement-equals-sibling': { severity: 'error', meaning: 'A key has the bitting of another key under the same master.' },
  'placement-equals-key': { severity: 'error', meaning: 'A key has the bitting of another key of the system.' },
  // Generating change keys.
  'progress-held': { severity: 'error', meaning: 'A chamber to progress is one the master holds constant.' },
  'progress-constants': { severity: 'error', meaning: 'Rotating constant progression keeps 1 to (progressed chambers − 1) positions at the master’s depth per key.' },
  'progress-chamber': { severity: 'error', meaning: 'A chamber to progress is not a chamber of this profile.' },
  'progress-too-large': { severity: 'error', meaning: 'The progression would list too many keys; set a limit.' },
  'progress-limit': { severity: 'error', meaning: 'The limit must be a whole number, zero or more.' },
  // Checking a profile (validateProfile).
  'profile-chambers': { severity: 'error', meaning: `A profile has ${chamberRange.min} to ${chamberRange.max} chambers.` },
  'profile-depths': { severity: 'error', meaning: `The depth range must be whole numbers within ${depthRange.min}..${depthRange.max}, shallowest first.` },
  'profile-stack': { severity: 'error', meaning: `Stack height and sleeve do not leave room for every depth and a top pin, or lie outside ${stackRange.min} to ${stackRange.max} and ${sleeveRange.min} to ${sleeveRange.max} units.` },
  'profile-wafer': { severity: 'error', meaning: `The thinnest wafer must be a whole number of units, ${waferRange.min} to ${waferRange.max}.` },
  'profile-step': { severity: 'error', meaning: `The progression step must be ${stepRange.min} or ${stepRange.max}.` },
  'profile-macs': { severity: 'error', meaning: `The maximum adjacent cut must be a whole number, ${adjacentCutRange.min} to ${adjacentCutRange.max}.` },
  'profile-stock': { severity: 'error', meaning: `Stocked sizes must be listed (${stockedSizesRange.min} to ${stockedSizesRange.max} of each part), as whole numbers of units from ${partSizeRange.min} to ${partSizeRange.max}.` },
} as const satisfies Record<string, { severity: 'error' | 'warning'; meaning: string }>;

export type KeyingIssueCode = keyof typeof keyingIssueCodes;

export const systemAuditFindingCodes = {
  'bad-bitting': { severity: 'error', meaning: 'A key’s bitting cannot be read; the key is left out of the other checks.' },
  'unknown-key': { severity: 'error', meaning: 'A core lists a key that is not in the system.' },
  'unknown-core': { severity: 'error', meaning: 'A key lists a core that is not in the system.' },
  'control-equals-key': { severity: 'error', meaning: 'A key of the system has the control key’s bitting.' },
  'key-releases-core': { severity: 'error', meaning: 'A key lines up the control shear line of cores it is not the control key of: whoever holds it can remove them.' },
  'control-turns-plug': { severity: 'error', meaning: 'The control key would turn the plug of these cores.' },
  'core-unbuildable': { severity: 'error', meaning: 'A core cannot be pinned as planned.' },
  'duplicate-bitting': { severity: 'error', meaning: 'Several key symbols share one bitting.' },
  'unintended-access': { severity: 'error', meaning: 'A key turns cores it is not meant to operate.' },
  'intended-key-fails': { severity: 'error', meaning: 'A key does not turn a core it is meant to operate.' },
  'records-disagree': { severity: 'warning', meaning: 'The key’s list of cores and the cores’ lists of keys disagree.' },
  'openings-over-threshold': { severity: 'warning', meaning: 'A core accepts more bittings than the system’s threshold.' },
  'change-keys-too-close': { severity: 'warning', meaning: 'Change keys differ in one position only, by less than the progression step.' },
  'control-shares-top-master': { severity: 'warning', meaning: 'The control key has the top master’s depth in some chamber.' },
  'parity-broken': { severity: 'warning', meaning: 'A key does not keep the top master’s parity in some position.' },
  'macs-exceeded': { severity: 'error', meaning: 'A key breaks the maximum adjacent cut specification; it cannot be cut.' },
  'control-openings': { severity: 'info', meaning: 'How many bittings release the cores: the control key alone, or more where a two-wafer seam meets the control line.' },
  'change-keys-one-apart': { severity: 'info', meaning: 'Change keys one position apart: the normal minimum of two-step progression, counted as a property of the design.' },
  'rights-amplification': { severity: 'info', meaning: 'How far one change key and its core expose the top master.' },
} as const satisfies Record<string, { severity: 'error' | 'warning' | 'info'; meaning: string }>;

export type SystemAuditFindingCode = keyof typeof systemAuditFindingCodes;
