/** Key holders and departments (office roles only), the holders' CSV import, and who can open what. */
import {
  DepartmentAnswer,
  DepartmentList,
  HolderAnswer,
  HolderList,
  type DepartmentInput,
  type HolderInput,
  type HolderQuery,
  type HolderUpdate,
} from '@shared/schemas/keyControl';
import { DoorAccess, HolderAccess } from '@shared/schemas/keyControlExposure';
import { toQuery, uploadCsv } from './doors';
import { request } from './http';

export type { Department, Holder, HolderStatus, KeyIssue } from '@shared/schemas/keyControl';

export const listDepartments = async () => (await request('GET', '/api/departments', { schema: DepartmentList })).departments;
export const createDepartment = async (input: DepartmentInput) => (await request('POST', '/api/departments', { body: input, schema: DepartmentAnswer })).department;

export const listHolders = async (filter: HolderQuery = {}) => (await request('GET', `/api/holders${toQuery({ ...filter })}`, { schema: HolderList })).holders;
/** The holder with every copy still out (for someone leaving: the keys to return). */
export const getHolder = (id: string) => request('GET', `/api/holders/${id}`, { schema: HolderAnswer });
export const createHolder = async (input: HolderInput) => (await request('POST', '/api/holders', { body: input, schema: HolderAnswer.pick({ holder: true }) })).holder;
export const updateHolder = (id: string, patch: HolderUpdate) => request('PATCH', `/api/holders/${id}`, { body: patch, schema: HolderAnswer });
export const importHolders = (file: File, commit: boolean) => uploadCsv('/api/holders/import', file, commit);

/** Every door the holder's keys turn, and how. */
export const holderAccess = async (id: string) => (await request('GET', `/api/holders/${id}/access`, { schema: HolderAccess })).doors;
/** Every holder whose key turns the door's installed core, and how. */
export const doorAccess = (doorId: string) => request('GET', `/api/doors/${doorId}/access`, { schema: DoorAccess });
