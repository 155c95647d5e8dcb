/** Accounts as the API answers them (admin), and the people work orders can be assigned to. */
import { z } from 'zod';
import { Role } from './auth';

export const AdminUser = z.object({
  id: z.uuid(),
  email: z.string(),
  name: z.string(),
  role: Role,
  active: z.boolean(),
  createdAt: z.string(),
  hasPassword: z.boolean(),
});
export type AdminUser = z.infer<typeof AdminUser>;
export const AdminUserList = z.object({ users: z.array(AdminUser) });
export type AdminUserList = z.infer<typeof AdminUserList>;
export const AdminUserAnswer = z.object({ user: AdminUser });
export type AdminUserAnswer = z.infer<typeof AdminUserAnswer>;
export const Technician = z.object({ id: z.uuid(), name: z.string(), email: z.string(), role: Role });
export type Technician = z.infer<typeof Technician>;
export const TechnicianList = z.object({ technicians: z.array(Technician) });
export type TechnicianList = z.infer<typeof TechnicianList>;
