/**
 * Records kept by the server: key systems, keys, doors, cores, work orders. A schema and
 * its type share one name. Write bodies are strict: an unknown field is refused.
 */
import { z } from 'zod';
import { BittingText, Id, IsoDate, IsoDateTime, Name, Notes, Text } from './common';
import { chamberRange } from '../keying/limits';
import { levelNames } from '../words';

export const KeyLevel = z.enum(['ggm', 'gm', 'master', 'change']);
export type KeyLevel = z.infer<typeof KeyLevel>;
export const KeyStatus = z.enum(['active', 'lost', 'retired']);
export type KeyStatus = z.infer<typeof KeyStatus>;
export const CoreState = z.enum(['planned', 'loaded', 'checked', 'capped', 'installed', 'retired']);
export type CoreState = z.infer<typeof CoreState>;
export const WorkOrderPurpose = z.enum(['new-building', 'lost-key-rekey', 'move', 'maintenance', 'other']);
export type WorkOrderPurpose = z.infer<typeof WorkOrderPurpose>;
export const WorkOrderStatus = z.enum(['draft', 'assigned', 'in-progress', 'done', 'cancelled']);
export type WorkOrderStatus = z.infer<typeof WorkOrderStatus>;

export const purposeLabels: Record<WorkOrderPurpose, string> = {
  'new-building': 'New building',
  'lost-key-rekey': 'Lost-key rekey',
  move: 'Department move',
  maintenance: 'Maintenance',
  other: 'Other',
};
/** The screens' names for the levels: shared/words.ts. */
export const levelLabels: Record<KeyLevel, string> = levelNames;

// ---- key systems and keys ---------------------------------------------------------------
export const KeySystemInput = z.strictObject({
  name: Name(120, 'a name for the key system'),
  profileId: Name(40, 'a profile'),
  control: BittingText,
  notes: Notes(2000, 'notes').optional(),
});
export type KeySystemInput = z.infer<typeof KeySystemInput>;
/** A new key system may bring its top master (the key every master hangs under) in the same step. */
export const TopMasterInput = z.strictObject({
  symbol: z.string().trim().regex(/^[A-Z0-9][A-Z0-9-]{0,23}$/i, { error: 'a key symbol is 1 to 24 letters, digits or dashes, like A' }),
  level: z.enum(['ggm', 'gm', 'master'], { error: 'the top master is a great-grand master, grand master or master' }),
  bitting: BittingText,
});
export const KeySystemCreate = KeySystemInput.extend({ topMaster: TopMasterInput.optional() });
export type KeySystemCreate = z.infer<typeof KeySystemCreate>;
export const KeySystemUpdate = KeySystemInput.partial();
export type KeySystemUpdate = z.infer<typeof KeySystemUpdate>;

export const KeySystem = z.object({
  id: Id,
  name: z.string(),
  profileId: z.string(),
  notes: z.string().nullable(),
  keyCount: z.number(),
  coreCount: z.number(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /** Present only when the caller asked to see bittings (an audited action). */
  control: z.string().optional(),
});
export type KeySystem = z.infer<typeof KeySystem>;

export const KeySymbol = z.string().trim().regex(/^[A-Z0-9][A-Z0-9-]{0,23}$/i, { error: 'a key symbol is 1 to 24 letters, digits or dashes, like AA1' });
export const KeyInput = z.strictObject({
  symbol: KeySymbol,
  level: KeyLevel,
  parentId: Id.nullable().optional(),
  bitting: BittingText,
  status: KeyStatus.default('active'),
  crossKeyed: z.boolean().default(false),
  notes: Notes(500, 'notes').optional(),
});
export type KeyInput = z.infer<typeof KeyInput>;

/** A progression preview request (keying primer, "Progression"): nothing is saved. */
export const ProgressionMethod = z.enum(['total-position', 'rotating-constant'], { error: 'the method is total-position or rotating-constant' });
export type ProgressionMethod = z.infer<typeof ProgressionMethod>;
export const progressionMethodLabels: Record<ProgressionMethod, string> = {
  'total-position': 'Total position progression',
  'rotating-constant': 'Rotating constant',
};
export const ProgressionInput = z.strictObject({
  progress: z.array(z.number().int().min(1).max(chamberRange.max)).min(1, { error: 'choose at least one chamber to progress' }).max(chamberRange.max),
  parentId: Id,
  method: ProgressionMethod.default('total-position'),
  /** Rotating constant: progressed chambers kept at the master's depth in each key. */
  constants: z.number().int().min(1, { error: 'keep at least one chamber constant' }).max(chamberRange.max - 1).default(1),
  limit: z.number().int().min(1).max(5000).default(200),
  symbolPrefix: z.string().trim().regex(/^[A-Z0-9-]{1,20}$/i, { error: 'a symbol prefix is letters, digits or dashes' }).optional(),
});
export type ProgressionInput = z.input<typeof ProgressionInput>;
export const ProgressedKey = z.object({ symbol: z.string(), level: KeyLevel, parentId: Id, bitting: z.string() });
export type ProgressedKey = z.infer<typeof ProgressedKey>;
/** A key the progression made but the system audit refused, with the audit's reasons. */
export const HeldKey = z.object({ bitting: z.string(), reasons: z.array(z.object({ code: z.string(), message: z.string() })) });
export type HeldKey = z.infer<typeof HeldKey>;
export const ProgressionPreview = z.object({ keys: z.array(ProgressedKey), held: z.array(HeldKey) });
export type ProgressionPreview = z.infer<typeof ProgressionPreview>;
export const KeyUpdate = z.strictObject({
  symbol: KeySymbol.optional(),
  status: KeyStatus.optional(),
  parentId: Id.nullable().optional(),
  notes: Notes(500, 'notes').optional(),
  bitting: BittingText.optional(),
});
export type KeyUpdate = z.infer<typeof KeyUpdate>;

export const Key = z.object({
  id: Id,
  keySystemId: Id,
  symbol: z.string(),
  level: KeyLevel,
  parentId: Id.nullable(),
  status: KeyStatus,
  crossKeyed: z.boolean(),
  notes: z.string().nullable(),
  /** Present only when the caller asked to see bittings (an audited action). */
  bitting: z.string().optional(),
});
export type Key = z.infer<typeof Key>;

/** A core a key turns: `intended` when the core is pinned for the key, otherwise incidental. */
export const KeyOperatesRow = z.object({
  coreId: Id,
  tag: z.string(),
  state: z.enum(['planned', 'loaded', 'checked', 'capped', 'installed', 'retired']),
  doorId: Id.nullable(),
  doorLabel: z.string().nullable(),
  intended: z.boolean(),
});
export type KeyOperatesRow = z.infer<typeof KeyOperatesRow>;

/** A new key in the place of one lost or worn out: same level and master, a new symbol and bitting. */
export const KeyReplace = z.strictObject({
  symbol: KeySymbol,
  bitting: BittingText,
  /** What became of the old key: lost (a security matter) or retired. */
  oldStatus: z.enum(['lost', 'retired'], { error: 'oldStatus is lost or retired' }).default('retired'),
});
export type KeyReplace = z.infer<typeof KeyReplace>;

// ---- doors -----------------------------------------------------------------------------
const doorFields = {
  site: Name(80, 'the site'),
  building: Name(80, 'the building'),
  floor: Text(20, 'the floor'),
  room: Text(40, 'the room'),
  label: z.string().trim().regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]{0,39}$/, { error: 'a door label is 1 to 40 letters, digits, spaces, dots, dashes or slashes' }),
  fireRated: z.boolean({ error: 'fireRated is true or false' }),
  keySystemId: Id.nullable().optional(),
  keyId: Id.nullable().optional(),
  notes: Notes(1000, 'notes').optional(),
};
export const DoorInput = z.strictObject({ ...doorFields, floor: doorFields.floor.default(''), room: doorFields.room.default(''), fireRated: doorFields.fireRated.default(false) });
export type DoorInput = z.infer<typeof DoorInput>;
/** `retired: true` takes the door out of lists and new work orders (its history stays); `false` brings it back. */
// No defaults here: a field left out of a PATCH stays as it is.
export const DoorUpdate = z.strictObject(doorFields).partial().extend({ retired: z.boolean({ error: 'retired is true or false' }).optional() });
export type DoorUpdate = z.infer<typeof DoorUpdate>;

export const Door = z.object({
  id: Id,
  site: z.string(),
  building: z.string(),
  floor: z.string(),
  room: z.string(),
  label: z.string(),
  fireRated: z.boolean(),
  keySystemId: Id.nullable(),
  keyId: Id.nullable(),
  keySymbol: z.string().nullable(),
  notes: z.string().nullable(),
  currentCoreTag: z.string().nullable(),
  retiredAt: z.string().nullable(),
});
export type Door = z.infer<typeof Door>;

// ---- cores -----------------------------------------------------------------------------
export const CoreInput = z.strictObject({
  keySystemId: Id,
  doorId: Id.nullable().optional(),
  /** Key ids that must turn the plug: the change key and its masters, and any cross-keyed key. */
  operatingKeyIds: z.array(Id).min(1, { error: 'a core needs at least one operating key' }).max(12),
  tag: z.string().trim().regex(/^[A-Z0-9-]{3,24}$/, { error: 'a tag is 3 to 24 capital letters, digits or dashes' }).optional(),
});
export type CoreInput = z.infer<typeof CoreInput>;
export const CoreUpdate = z.strictObject({
  doorId: Id.nullable().optional(),
  state: z.literal('retired').optional(),
});
export type CoreUpdate = z.infer<typeof CoreUpdate>;

export const Core = z.object({
  id: Id,
  tag: z.string(),
  keySystemId: Id,
  doorId: Id.nullable(),
  doorLabel: z.string().nullable(),
  state: CoreState,
  /** The symbols of the keys that operate the core, highest level first. */
  operatingSymbols: z.array(z.string()),
  updatedAt: z.string(),
});
export type Core = z.infer<typeof Core>;

// ---- work orders -----------------------------------------------------------------------
export const WorkOrderDoor = z.strictObject({
  doorId: Id,
  /** The change key the door takes; its masters are added from the key's parents. */
  keyId: Id,
  /** A second change key that must also open this door (cross-keyed); its masters are not added. */
  crossKeyId: Id.nullable().optional(),
});
export type WorkOrderDoor = z.infer<typeof WorkOrderDoor>;
export const WorkOrderDoorsAdd = z.strictObject({
  doors: z.array(WorkOrderDoor).min(1, { error: 'choose at least one door' }).max(500, { error: 'at most 500 doors at once' }),
});
export const WorkOrderInput = z.strictObject({
  title: Name(120, 'a title'),
  purpose: WorkOrderPurpose,
  keySystemId: Id,
  assigneeId: Id.nullable().optional(),
  dueDate: IsoDate.nullable().optional(),
  notes: Notes(2000, 'notes').optional(),
  doors: z.array(WorkOrderDoor).min(1, { error: 'choose at least one door' }).max(500, { error: 'at most 500 doors in one work order' }),
});
export type WorkOrderInput = z.infer<typeof WorkOrderInput>;
export const WorkOrderUpdate = z.strictObject({
  title: Name(120, 'a title').optional(),
  purpose: WorkOrderPurpose.optional(),
  assigneeId: Id.nullable().optional(),
  dueDate: IsoDate.nullable().optional(),
  notes: Notes(2000, 'notes').optional(),
  status: z.enum(['draft', 'assigned', 'cancelled']).optional(),
});
export type WorkOrderUpdate = z.infer<typeof WorkOrderUpdate>;

export const WorkOrder = z.object({
  id: Id,
  number: z.number(),
  title: z.string(),
  purpose: WorkOrderPurpose,
  keySystemId: Id,
  keySystemName: z.string(),
  assigneeId: Id.nullable(),
  assigneeName: z.string().nullable(),
  dueDate: z.string().nullable(),
  status: WorkOrderStatus,
  notes: z.string().nullable(),
  coreCount: z.number(),
  doneCount: z.number(),
  failedCount: z.number(),
  hasFireRated: z.boolean(),
  createdAt: z.string(),
});
export type WorkOrder = z.infer<typeof WorkOrder>;

export const Timestamps = { createdAt: IsoDateTime, updatedAt: IsoDateTime };
