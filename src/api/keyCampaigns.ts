/** Key audit campaigns: started by the office; answered by each holder from a mailed link without signing in. */
import { CampaignLinkAnswer, KeyCampaignAnswer, KeyCampaignList, type CampaignConfirm, type KeyCampaignInput } from '@shared/schemas/keyControlCampaigns';
import { request } from './http';

export type { CampaignLinkAnswer, KeyCampaign, KeyCampaignSummary } from '@shared/schemas/keyControlCampaigns';

/** Saved, then each holder with keys out in the scope is mailed a link. */
export const startCampaign = async (input: KeyCampaignInput) => (await request('POST', '/api/key-campaigns', { body: input, schema: KeyCampaignAnswer })).campaign;
export const listCampaigns = async () => (await request('GET', '/api/key-campaigns', { schema: KeyCampaignList })).campaigns;
export const getCampaign = async (id: string) => (await request('GET', `/api/key-campaigns/${id}`, { schema: KeyCampaignAnswer })).campaign;

/** The holder's link: no sign-in, the token from the address's fragment. */
export const viewCampaignLink = (token: string) => request('POST', '/api/key-campaign-links/view', { body: { token }, schema: CampaignLinkAnswer, auth: false });
export const confirmKeys = (input: CampaignConfirm) => request('POST', '/api/key-campaign-links/confirm', { body: input, schema: CampaignLinkAnswer, auth: false });
