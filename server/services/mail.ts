/**
 * Outgoing e-mail through nodemailer. In development and tests the transport points at the
 * fake SMTP server (server/dev/fakeSmtp.ts); with no SMTP configured, mail is logged as
 * "not sent" (never its body). Sending never fails the request that caused it.
 * No mail ever carries a bitting.
 */
import nodemailer from 'nodemailer';
import type { Config } from '../config';

export interface Mail {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  send(mail: Mail): Promise<void>;
}

export function createMailer(config: Config, log: (msg: string) => void = console.log): Mailer {
  const transport = config.smtp
    ? nodemailer.createTransport({ host: config.smtp.host, port: config.smtp.port, secure: false, ignoreTLS: true })
    : null;
  return {
    async send(mail) {
      if (!transport) {
        log(`[mail] no SMTP configured; not sent: "${mail.subject}" to ${mail.to}`);
        return;
      }
      try {
        await transport.sendMail({ from: config.mailFrom, ...mail });
      } catch (err) {
        log(`[mail] sending "${mail.subject}" to ${mail.to} failed: ${(err as Error).message}`);
      }
    },
  };
}

/** What became of a core after a failed key check, as the tablet knew it when it synced. */
export type KeyCheckOutcome = { kind: 'waits' } | { kind: 'passed'; at: string; attempt: number | null };

export const mails = {
  invitation(name: string, link: string, inviter: string): Omit<Mail, 'to'> {
    return {
      subject: 'Your Corewright account',
      text: `Hello ${name},\n\n${inviter} has made you a Corewright account. Choose your password here (the link works once, for 72 hours):\n\n${link}\n\nIf you did not expect this, ignore this message.\n`,
    };
  },
  workOrderAssigned(o: { number: number; title: string; cores: number; due: string | null; link: string }): Omit<Mail, 'to'> {
    return {
      subject: `Work order #${o.number} assigned to you: ${o.title}`,
      text: `Work order #${o.number}, "${o.title}", is yours: ${o.cores} core(s)${o.due ? `, due ${o.due}` : ''}.\n\nOpen Corewright and keep it on your tablet before you go offline:\n${o.link}\n`,
    };
  },
  workOrderFinished(o: { number: number; title: string; cores: number; link: string }): Omit<Mail, 'to'> {
    return {
      subject: `Work order #${o.number} finished: ${o.title}`,
      text: `Every core of work order #${o.number}, "${o.title}" (${o.cores}), has passed its key check.\n\nThe completion log has the details:\n${o.link}\n`,
    };
  },
  keyCheckFailed(o: { number: number | null; title: string | null; tag: string; door: string | null; technician: string; notes: string[]; outcome: KeyCheckOutcome; link: string }): Omit<Mail, 'to'> {
    const passed = o.outcome.kind === 'passed';
    const after = o.outcome.kind === 'passed'
      ? `The core was rebuilt and passed its key check${o.outcome.attempt ? ` on attempt ${o.outcome.attempt}` : ''} at ${o.outcome.at.replace('T', ' ').slice(0, 16)} UTC, before the tablet synced; no rebuild is waiting.`
      : 'The core waits for a rebuild.';
    return {
      subject: `${passed ? 'Key check failed, then passed' : 'Failed key check'}: core ${o.tag}${o.door ? ` for ${o.door}` : ''}`,
      text: `${o.technician} recorded a failed key check on core ${o.tag}${o.door ? ` (door ${o.door})` : ''}${o.number ? `, work order #${o.number} "${o.title}"` : ''}.\n${o.notes.length ? `\nWhat happened:\n${o.notes.map((n) => `- ${n}`).join('\n')}\n` : ''}\n${after} Completion log:\n${o.link}\n`,
    };
  },
  keyDue(o: { holder: string; symbol: string; copy: number; due: string }): Omit<Mail, 'to'> {
    return {
      subject: `Key ${o.symbol} copy ${o.copy} is due back`,
      text: `Hello ${o.holder},\n\nKey ${o.symbol}, copy ${o.copy}, issued to you, was due back on ${o.due}. Please return it to the key office, or tell them if you still need it.\n`,
    };
  },
  /** The key audit's link: first sent, a reminder, or sent again; a later one replaces the link before it. */
  keyAudit(o: { holder: string; number: number; title: string; copies: { keySymbol: string; copyNumber: number }[]; expires: string; link: string; reminder?: boolean; again?: boolean }): Omit<Mail, 'to'> {
    const later = o.reminder || o.again;
    return {
      subject: `${o.reminder ? 'Reminder: ' : ''}Key audit #${o.number}: please confirm the keys you hold`,
      text: `Hello ${o.holder},\n\n${o.reminder ? 'We have not had your answer yet. ' : ''}The key office is checking who holds which key (${o.title}). Our records show these keys issued to you:\n${o.copies.map((c) => `- key ${c.keySymbol}, copy ${c.copyNumber}`).join('\n')}\n\nPlease say which you still hold, and flag any you cannot find, here (the link works once, until ${o.expires}; no sign-in needed):\n${o.link}\n${later ? '\nThis link replaces the one in any earlier key audit e-mail, which no longer works.\n' : ''}`,
    };
  },
  keyRequest(o: { authoriser: string; number: number; holder: string; department: string; reason: string; symbol: string; doors: string[]; beyond: string[]; link: string; again?: boolean }): Omit<Mail, 'to'> {
    return {
      subject: `Key request #${o.number}: ${o.holder} (${o.department})`,
      text: `Hello ${o.authoriser},\n\n${o.holder} of ${o.department} asks for a key for: ${o.doors.join(', ')}.\nWhy: ${o.reason}\n\nProposed key: ${o.symbol}.${o.beyond.length ? ` It also opens: ${o.beyond.join(', ')}.` : ' It opens no other door.'}\n\nApprove or refuse here (the link works once, for 72 hours; no sign-in needed):\n${o.link}\n${o.again ? '\nThis link replaces the one in the earlier e-mail about this request, which no longer works.\n' : ''}`,
    };
  },
};
