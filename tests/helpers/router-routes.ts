/** Walks an Express router: the tests that must cover every route read them from the router itself. */

interface Layer {
  route?: { path: unknown; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
  rawPath?: unknown;
  slash?: boolean;
}

/** Every (method, path) registered on a router, nested routers included, paths as mounted under `prefix`. */
export function routesOf(router: unknown, prefix = ''): { method: string; path: string }[] {
  const out: { method: string; path: string }[] = [];
  for (const layer of (router as { stack: Layer[] }).stack) {
    if (layer.route) {
      const paths = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
      for (const p of paths)
        for (const [method, on] of Object.entries(layer.route.methods)) if (on) out.push({ method, path: prefix + String(p) });
    } else if (layer.handle?.stack) {
      const mount = layer.slash || layer.rawPath === undefined || layer.rawPath === '/' ? '' : String(layer.rawPath);
      out.push(...routesOf(layer.handle, prefix + mount));
    }
  }
  return out;
}
