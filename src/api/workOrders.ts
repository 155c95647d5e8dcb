/** Work orders: list, create (cores and charts computed by the server), detail, reassign, charts for printing. */
import type { WorkOrderDoor, WorkOrderInput, WorkOrderStatus, WorkOrderUpdate } from '@shared/schemas/records';
import { TechnicianList } from '@shared/schemas/users';
import { PacketAnswer, PinningPreview, WorkOrderAnswer, WorkOrderDetail, WorkOrderDoorsAdded, WorkOrderList } from '@shared/schemas/workOrders';
import { request } from './http';

export type { Technician } from '@shared/schemas/users';
export type { PinningPreview, WorkOrderCore, WorkOrderDetail } from '@shared/schemas/workOrders';

export const listWorkOrders = async (status?: WorkOrderStatus | 'open') =>
  (await request('GET', `/api/work-orders${status ? `?status=${status}` : ''}`, { schema: WorkOrderList })).workOrders;
export const getWorkOrder = (id: string) => request('GET', `/api/work-orders/${id}`, { schema: WorkOrderDetail });
export const createWorkOrder = async (input: WorkOrderInput) => (await request('POST', '/api/work-orders', { body: input, schema: WorkOrderAnswer })).workOrder;
export const updateWorkOrder = async (id: string, patch: WorkOrderUpdate) => (await request('PATCH', `/api/work-orders/${id}`, { body: patch, schema: WorkOrderAnswer })).workOrder;
export const addWorkOrderDoors = async (id: string, doors: WorkOrderDoor[]) => (await request('POST', `/api/work-orders/${id}/doors`, { body: { doors }, schema: WorkOrderDoorsAdded })).workOrder;
export const removeWorkOrderCore = async (id: string, coreId: string) => (await request('DELETE', `/api/work-orders/${id}/cores/${coreId}`, { schema: WorkOrderAnswer })).workOrder;
/** The engine's chart for a door's keys before anything is saved; no depths in the answer. */
export const previewPinning = (input: { keySystemId: string; keyId: string; crossKeyId?: string }) => request('POST', '/api/pinning-preview', { body: input, schema: PinningPreview });
/** Charts hold depths: the server audits this read. */
export const getCharts = async (id: string) => (await request('GET', `/api/work-orders/${id}/charts`, { schema: PacketAnswer })).packet;
export const listTechnicians = async () => (await request('GET', '/api/technicians', { schema: TechnicianList })).technicians;
