/** The routes an Express app registers, as `METHOD /path` (for the role matrix and the response schemas). */
import type { Express } from 'express';

interface Layer {
  route?: { path: string; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
  match?: (path: string) => unknown;
}

export function routesOf(stack: Layer[], prefix: string, out: string[] = []): string[] {
  for (const layer of stack) {
    if (layer.route) {
      for (const [m, on] of Object.entries(layer.route.methods)) if (on && m !== '_all') out.push(`${m.toUpperCase()} ${prefix}${layer.route.path}`);
    } else if (layer.handle?.stack) {
      routesOf(layer.handle.stack, prefix, out);
    }
  }
  return out;
}

/** The routers mounted on the app itself (the /api router; a static folder adds one more). */
export const mountedRouters = (app: Express): Layer[] => (app as unknown as { router: { stack: Layer[] } }).router.stack.filter((l) => l.handle?.stack);
