/** Work orders: list, create (cores and charts computed by the server), detail, reassign, charts for printing. */
import { z } from 'zod';
import { Packet } from '@shared/schemas/packet';
import { CoreState, WorkOrder, type WorkOrderDoor, type WorkOrderInput, type WorkOrderStatus, type WorkOrderUpdate } from '@shared/schemas/records';
import { Role } from '@shared/schemas/auth';
import { request } from './http';

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

export const Technician = z.object({ id: z.uuid(), name: z.string(), email: z.string(), role: Role });
export type Technician = z.infer<typeof Technician>;

const One = z.object({ workOrder: WorkOrder });

export const listWorkOrders = async (status?: WorkOrderStatus | 'open') =>
  (await request('GET', `/api/work-orders${status ? `?status=${status}` : ''}`, { schema: z.object({ workOrders: z.array(WorkOrder) }) })).workOrders;
export const getWorkOrder = (id: string) => request('GET', `/api/work-orders/${id}`, { schema: WorkOrderDetail });
export const createWorkOrder = async (input: WorkOrderInput) => (await request('POST', '/api/work-orders', { body: input, schema: One })).workOrder;
export const updateWorkOrder = async (id: string, patch: WorkOrderUpdate) => (await request('PATCH', `/api/work-orders/${id}`, { body: patch, schema: One })).workOrder;
export const addWorkOrderDoors = async (id: string, doors: WorkOrderDoor[]) => (await request('POST', `/api/work-orders/${id}/doors`, { body: { doors }, schema: One })).workOrder;
export const removeWorkOrderCore = async (id: string, coreId: string) => (await request('DELETE', `/api/work-orders/${id}/cores/${coreId}`, { schema: One })).workOrder;
export const PinningPreview = z.object({
  issues: z.array(z.looseObject({ severity: z.enum(['error', 'warning', 'info']), message: z.string() })),
  openingsCount: z.number(),
  chain: z.array(z.string()),
});
export type PinningPreview = z.infer<typeof PinningPreview>;
/** The engine's chart for a door's keys before anything is saved; no depths in the answer. */
export const previewPinning = (input: { keySystemId: string; keyId: string; crossKeyId?: string }) => request('POST', '/api/pinning-preview', { body: input, schema: PinningPreview });
/** Charts hold depths: the server audits this read. */
export const getCharts = async (id: string) => (await request('GET', `/api/work-orders/${id}/charts`, { schema: z.object({ packet: Packet }) })).packet;
export const listTechnicians = async () => (await request('GET', '/api/technicians', { schema: z.object({ technicians: z.array(Technician) }) })).technicians;
