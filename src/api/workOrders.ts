/** Work orders: list, create (cores and charts computed by the server), detail, reassign, charts for printing. */
import { z } from 'zod';
import { Packet } from '@shared/schemas/packet';
import { CoreState, WorkOrder, type WorkOrderInput, type WorkOrderStatus, type WorkOrderUpdate } from '@shared/schemas/records';
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
/** Charts hold depths: the server audits this read. */
export const getCharts = async (id: string) => (await request('GET', `/api/work-orders/${id}/charts`, { schema: z.object({ packet: Packet }) })).packet;
export const listTechnicians = async () => (await request('GET', '/api/technicians', { schema: z.object({ technicians: z.array(Technician) }) })).technicians;
