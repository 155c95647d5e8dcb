/**
 * The offline packet: everything a technician's tablet needs to build and install the
 * cores of one work order with no network. Computed by the server with shared/keying.
 * The key-check plan names keys by symbol only: the technician holds the physical keys.
 */
import { z } from 'zod';
import type { CorePinning, Profile, Tray } from '../keying';
import { CoreState, KeyLevel, WorkOrderPurpose, WorkOrderStatus } from './records';

export const KeyCheckRole = z.enum(['change', 'master', 'cross', 'control', 'must-not-turn']);
export type KeyCheckRole = z.infer<typeof KeyCheckRole>;

/**
 * Why a must-not-turn key was chosen: a change key under the same master as this core's
 * change key (a neighbour's door), or a key of another master (another area). Optional, so
 * packets and stored Bench sessions from before it still parse.
 */
export const MustNotTurnWhy = z.object({
  relation: z.enum(['sibling', 'other-master']),
  /** The master this core's change key sits under. */
  ownMaster: z.string().nullable(),
  /** other-master: the master the chosen key belongs to (itself, when it is a master). */
  otherMaster: z.string().nullable(),
});
export type MustNotTurnWhy = z.infer<typeof MustNotTurnWhy>;

export const KeyCheckItem = z.object({
  role: KeyCheckRole,
  symbol: z.string(),
  level: KeyLevel.nullable(),
  /** turns: the plug turns; releases: the control key turns about 15 degrees and frees the core; none: must not turn. */
  expect: z.enum(['turns', 'releases', 'none']),
  why: MustNotTurnWhy.optional(),
});
export type KeyCheckItem = z.infer<typeof KeyCheckItem>;

export const PacketDoor = z.object({
  id: z.uuid(),
  label: z.string(),
  site: z.string(),
  building: z.string(),
  floor: z.string(),
  room: z.string(),
  fireRated: z.boolean(),
  currentCoreTag: z.string().nullable(),
});
export type PacketDoor = z.infer<typeof PacketDoor>;

export const PacketCore = z.object({
  id: z.uuid(),
  tag: z.string(),
  state: CoreState,
  door: PacketDoor.nullable(),
  pinning: z.custom<CorePinning>((v) => typeof v === 'object' && v !== null && Array.isArray((v as CorePinning).chambers)),
  keyCheck: z.array(KeyCheckItem),
});
export type PacketCore = z.infer<typeof PacketCore>;

export const Packet = z.object({
  v: z.literal(1),
  workOrder: z.object({
    id: z.uuid(),
    number: z.number(),
    title: z.string(),
    purpose: WorkOrderPurpose,
    status: WorkOrderStatus,
    dueDate: z.string().nullable(),
    notes: z.string().nullable(),
    hasFireRated: z.boolean(),
  }),
  keySystem: z.object({ id: z.uuid(), name: z.string() }),
  profile: z.custom<Profile>((v) => typeof v === 'object' && v !== null && typeof (v as Profile).chambers === 'number'),
  cores: z.array(PacketCore),
  tray: z.custom<Tray>((v) => typeof v === 'object' && v !== null && Array.isArray((v as Tray).perChamber)),
  fetchedAt: z.string(),
  /** The end of the shift the packet was fetched for: the tablet wipes it after this. */
  expiresAt: z.string(),
});
export type Packet = z.infer<typeof Packet>;
