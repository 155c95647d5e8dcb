/**
 * Serves the built PWA. The service worker and the HTML shell are never cached by HTTP,
 * so a new version reaches the update prompt; hashed assets are cached for a year.
 */
import express, { Router } from 'express';
import { existsSync } from 'node:fs';
import path from 'node:path';

export function staticRouter(dir: string): Router {
  const router = Router();
  if (!existsSync(path.join(dir, 'index.html'))) {
    router.get(/^(?!\/api\/).*/, (_req, res) => {
      res.status(503).type('text/plain').send('The client is not built yet: run `npm run build` (npm start does it for you).');
    });
    return router;
  }
  router.use(
    express.static(dir, {
      index: false,
      setHeaders(res, file) {
        const base = path.basename(file);
        if (base === 'sw.js' || base.endsWith('.html') || base === 'manifest.webmanifest' || base.startsWith('workbox-')) res.set('Cache-Control', 'no-cache');
        else if (file.includes(`${path.sep}assets${path.sep}`)) res.set('Cache-Control', 'public, max-age=31536000, immutable');
      },
    }),
  );
  // Client-side routes fall back to the shell.
  router.get(/^(?!\/api(\/|$)).*/, (req, res, next) => {
    if (!req.accepts('html')) return next();
    res.set('Cache-Control', 'no-cache').sendFile(path.join(dir, 'index.html'));
  });
  return router;
}
