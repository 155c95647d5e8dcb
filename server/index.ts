/** Starts the HTTP server (and, outside production with CW_FAKE_SMTP=1, the local fake SMTP). */
import { createApp } from './app';
import { loadConfig } from './config';
import { createDb } from './db';
import { startFakeSmtp, type FakeSmtp } from './dev/fakeSmtp';
import { createMailer } from './services/mail';
import { sweepFailures } from './services/failureLimiter';
import { sendPending } from './services/notifier';
import { queueKeyAuditReminders } from './services/keyAudits';
import { queueDueReminders } from './services/keyIssues';

// A promise nobody awaited must never stop the server for every other user (T1): log it, keep serving.
// (Node's default since v15 is to exit; ASVS 5 V16: errors are handled, not fatal.)
process.on('unhandledRejection', (reason) => {
  console.error('[server] unhandled rejection (kept serving):', reason instanceof Error ? (reason.stack ?? reason.message) : reason);
});

let config = loadConfig();
let smtp: FakeSmtp | undefined;
if (process.env.CW_FAKE_SMTP === '1' && config.env !== 'production') {
  smtp = await startFakeSmtp(Number(process.env.CW_FAKE_SMTP_PORT ?? 0));
  config = { ...config, smtp: { host: '127.0.0.1', port: smtp.port } };
  console.log(`[server] fake SMTP on 127.0.0.1:${smtp.port}; mailbox at /api/dev/mailbox`);
}
const db = createDb(config.databaseUrl);
const mailer = createMailer(config);
const app = createApp({ db, config, smtp, mailer });
// Mail owed by work that landed before a crash or restart, then every minute (CW_OWED_MAIL_INTERVAL_MS).
// Every instance runs this: each row is sent under a row lock, so N instances never send it twice.
const sendOwed = () => {
  // Copies past their due date owe their holder a reminder (one per copy), and a key audit's holders who have not
  // answered one a day; sent like any owed mail.
  void queueDueReminders(db)
    .then(() => queueKeyAuditReminders(db))
    .then(() => sendPending({ db, mailer, config }))
    .catch((err) => console.error('[server] sending notifications failed', (err as Error).message));
  void sweepFailures(db).catch(() => {}); // ended lockout windows; harmless when the database is away
};
sendOwed();
const owedTimer = setInterval(sendOwed, config.owedMailIntervalMs);
owedTimer.unref();
const server = app.listen(config.port, config.host, () => {
  console.log(`[server] Corewright on http://${config.host}:${config.port}`);
});

function shutdown(signal: string): void {
  console.log(`[server] ${signal}: closing`);
  server.close(() => void Promise.all([db.destroy(), smtp?.close()]).then(() => process.exit(0)));
  setTimeout(() => process.exit(0), 5000).unref();
}
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
