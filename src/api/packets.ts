/** The technician's side of work orders: the ones assigned to me, and their offline packets. */
import { z } from 'zod';
import { Packet } from '@shared/schemas/packet';
import { WorkOrder } from '@shared/schemas/records';
import { request } from './http';

export const listMyWorkOrders = async () => (await request('GET', '/api/work-orders?mine=1', { schema: z.object({ workOrders: z.array(WorkOrder) }) })).workOrders;

/** Downloading a packet is audited by the server (who, which tablet, when). */
export const fetchPacket = async (workOrderId: string) =>
  (await request('GET', `/api/work-orders/${workOrderId}/packet`, { schema: z.object({ packet: Packet }) })).packet;
