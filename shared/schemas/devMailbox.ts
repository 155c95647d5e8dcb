/** The development mailbox (never in production): mail the fake SMTP server caught, newest first. */
import { z } from 'zod';

export const CapturedMail = z.object({ id: z.number(), to: z.array(z.string()), from: z.string(), subject: z.string(), text: z.string(), receivedAt: z.string() });
export type CapturedMail = z.infer<typeof CapturedMail>;
export const Mailbox = z.object({ messages: z.array(CapturedMail) });
export type Mailbox = z.infer<typeof Mailbox>;
