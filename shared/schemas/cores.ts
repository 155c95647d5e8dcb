/** Cores as the API answers them (supervisors): one, or a list. */
import { z } from 'zod';
import { Core } from './records';

export const CoreList = z.object({ cores: z.array(Core) });
export type CoreList = z.infer<typeof CoreList>;
export const CoreAnswer = z.object({ core: Core });
export type CoreAnswer = z.infer<typeof CoreAnswer>;
