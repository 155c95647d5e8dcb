/** The technician's side of work orders: the ones assigned to me, and their offline packets. */
import { PacketAnswer, WorkOrderList } from '@shared/schemas/workOrders';
import { request } from './http';

export const listMyWorkOrders = async () => (await request('GET', '/api/work-orders?mine=1', { schema: WorkOrderList })).workOrders;

/** Downloading a packet is audited by the server (who, which tablet, when). */
export const fetchPacket = async (workOrderId: string) =>
  (await request('GET', `/api/work-orders/${workOrderId}/packet`, { schema: PacketAnswer })).packet;
