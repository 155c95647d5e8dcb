/** Work orders as the API answers them: lists, one with its cores, its packet or charts, and the pinning preview. */
import { z } from 'zod';
import { Packet } from './packet';
import { CoreState, WorkOrder } from './records';

export const WorkOrderList = z.object({ workOrders: z.array(WorkOrder) });
export type WorkOrderList = z.infer<typeof WorkOrderList>;
export const WorkOrderAnswer = z.object({ workOrder: WorkOrder });
export type WorkOrderAnswer = z.infer<typeof WorkOrderAnswer>;
export const WorkOrderCore = z.object({
  id: z.uuid(),
  tag: z.string(),
  state: CoreState,
  doorId: z.uuid().nullable(),
  doorLabel: z.string().nullable(),
  fireRated: z.boolean().nullable(),
  /** doorLabel is where the core IS; this is the door it was planned for. */
  plannedDoorLabel: z.string().nullable(),
  /** Installed in another door than planned, not yet reviewed. */
  doorMismatch: z.boolean(),
  keySymbol: z.string().nullable().optional(),
  crossKeySymbol: z.string().nullable().optional(),
});
export type WorkOrderCore = z.infer<typeof WorkOrderCore>;
export const WorkOrderDetail = z.object({ workOrder: WorkOrder, cores: z.array(WorkOrderCore) });
export type WorkOrderDetail = z.infer<typeof WorkOrderDetail>;
/** Doors added to a work order: the order again and the tags of the new cores. */
export const WorkOrderDoorsAdded = z.object({ workOrder: WorkOrder, tags: z.array(z.string()) });
export type WorkOrderDoorsAdded = z.infer<typeof WorkOrderDoorsAdded>;
/** A technician's packet, or the charts a supervisor prints: the same packet. */
export const PacketAnswer = z.object({ packet: Packet });
export type PacketAnswer = z.infer<typeof PacketAnswer>;
export const PinningPreview = z.object({
  /** The engine's pinning issues (shared/keying PinningIssue): chamber 1-based, key an index into the chain. */
  issues: z.array(z.object({ code: z.string(), severity: z.enum(['error', 'warning', 'info']), chamber: z.number().optional(), key: z.number().optional(), message: z.string() })),
  openingsCount: z.number(),
  controlOpeningsCount: z.number(),
  chain: z.array(z.string()),
});
export type PinningPreview = z.infer<typeof PinningPreview>;
