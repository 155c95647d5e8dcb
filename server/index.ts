/** Starts the HTTP server. Everything else lives in createApp(). */
import { createApp } from './app';
import { loadConfig } from './config';
import { createDb } from './db';

const config = loadConfig();
const db = createDb(config.databaseUrl);
const app = createApp({ db, config });
const server = app.listen(config.port, config.host, () => {
  console.log(`[server] Corewright on http://${config.host}:${config.port}`);
});

function shutdown(signal: string): void {
  console.log(`[server] ${signal}: closing`);
  server.close(() => void db.destroy().then(() => process.exit(0)));
  setTimeout(() => process.exit(0), 5000).unref();
}
process.on('SIGTERM', () => shutdown('SIGTERM'));
process.on('SIGINT', () => shutdown('SIGINT'));
