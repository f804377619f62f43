import type { Express } from 'express';

export interface RouteInfo {
  method: string;
  /** Full path as Express declares it, e.g. /api/records/:id/entries. */
  path: string;
}

interface LayerLike {
  rawPath?: string | string[];
  route?: { path: string; methods: Record<string, boolean> };
  handle?: { stack?: LayerLike[] };
}

/** Every route the app declares, read from Express's own router stack (so a new route cannot hide). */
export function listRoutes(app: Express): RouteInfo[] {
  const out: RouteInfo[] = [];
  const walk = (stack: LayerLike[], prefix: string) => {
    for (const layer of stack) {
      const raw = Array.isArray(layer.rawPath) ? layer.rawPath[0] : layer.rawPath;
      const here = raw && raw !== '/' && typeof raw === 'string' ? prefix + raw : prefix;
      if (layer.route) {
        for (const [method, on] of Object.entries(layer.route.methods)) {
          if (on && method !== '_all') out.push({ method: method.toUpperCase(), path: (prefix + layer.route.path).replace(/\/$/, '') || '/' });
        }
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack, here);
      }
    }
  };
  const root = (app as unknown as { router: { stack: LayerLike[] } }).router;
  walk(root.stack, '');
  const seen = new Set<string>();
  return out.filter((r) => {
    const key = `${r.method} ${r.path}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}
