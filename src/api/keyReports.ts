/**
 * Lost and stolen keys: the report of an issued copy with its exposure (through the engine), the
 * rekey plan and the one step that makes its work order; the re-issue tasks left when the new cores
 * are installed. No answer here carries a bitting.
 */
import { ExposureAnswer, KeyReportAnswer, KeyReportList, type KeyReportCloseInput, type KeyReportInput } from '@shared/schemas/keyControlExposure';
import { RekeyPlanAnswer, RekeyWorkOrderDone, type RekeyWorkOrderInput } from '@shared/schemas/keyControlRekey';
import { ReissueTaskAnswer, ReissueTaskList, type ReissueInput } from '@shared/schemas/keyControlReissue';
import { toQuery } from './doors';
import { request } from './http';

export type { ExposedCore, ExposedHolder, Exposure, KeyReport, KeyReportList, RemainingCore } from '@shared/schemas/keyControlExposure';
export type { RekeyChoice, RekeyOption, RekeyPlan } from '@shared/schemas/keyControlRekey';
export type { ReissueTask } from '@shared/schemas/keyControlReissue';
export type ReportSummary = KeyReportList['reports'][number];

export const reportCopy = async (issueId: string, input: KeyReportInput) => (await request('POST', `/api/key-issues/${issueId}/report`, { body: input, schema: KeyReportAnswer })).report;
export const listReports = async (status?: 'open' | 'closed') => (await request('GET', `/api/key-reports${toQuery({ status })}`, { schema: KeyReportList })).reports;
export const getReport = async (id: string) => (await request('GET', `/api/key-reports/${id}`, { schema: KeyReportAnswer })).report;
export const rekeyPlan = async (id: string) => (await request('GET', `/api/key-reports/${id}/plan`, { schema: RekeyPlanAnswer })).plan;
/** The plan's chosen option: new keys in place of the old ones and a work order for the Bench. */
export const makeWorkOrder = (id: string, input: RekeyWorkOrderInput) => request('POST', `/api/key-reports/${id}/work-order`, { body: input, schema: RekeyWorkOrderDone });

/** Closes a rebuilt report whose old key still turns some installed cores: they are accepted, with the note saying why. */
export const closeReport = async (id: string, input: KeyReportCloseInput) => (await request('POST', `/api/key-reports/${id}/close`, { body: input, schema: KeyReportAnswer })).report;

export const listReissueTasks = async (status?: 'open' | 'done') => (await request('GET', `/api/key-reissue-tasks${toQuery({ status })}`, { schema: ReissueTaskList })).tasks;
/** Closes the task: the new key issued to the holder (next copy number), the old copy taken back. */
export const reissueKey = async (id: string, input: ReissueInput) => (await request('POST', `/api/key-reissue-tasks/${id}/issue`, { body: input, schema: ReissueTaskAnswer })).task;

/** What the system's control key removes: every installed core it lines up (a lost control key exposes them all). */
export const controlExposure = async (keySystemId: string) => (await request('GET', `/api/key-systems/${keySystemId}/control-exposure`, { schema: ExposureAnswer })).exposure;
