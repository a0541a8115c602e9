/** Walks an Express router: the tests that must cover every route read them from the router itself. */

interface Layer {
  route?: { path: unknown; methods: Record<string, boolean> };
  handle?: { stack?: Layer[] };
  rawPath?: unknown;
  slash?: boolean;
}

/**
 * Every (method, path) registered on a router, nested routers included, paths as mounted under
 * `prefix` (`router.all` is method "all"). A route or router on a path that is not a string (a
 * regular expression) throws: a test that names every route could not name it.
 */
export function routesOf(router: unknown, prefix = ''): { method: string; path: string }[] {
  const out: { method: string; path: string }[] = [];
  for (const layer of (router as { stack: Layer[] }).stack) {
    if (layer.route) {
      const paths: unknown[] = Array.isArray(layer.route.path) ? layer.route.path : [layer.route.path];
      for (const p of paths) {
        if (typeof p !== 'string') throw new Error(`A route is registered with a non-string path (${String(p)}): a test cannot name it`);
        for (const [method, on] of Object.entries(layer.route.methods))
          if (on) out.push({ method: method === '_all' ? 'all' : method, path: prefix + p });
      }
    } else if (layer.handle?.stack) {
      const mount = layer.slash || layer.rawPath === undefined || layer.rawPath === '/' ? '' : layer.rawPath;
      if (typeof mount !== 'string') throw new Error(`A router is mounted on a non-string path (${String(mount)})`);
      out.push(...routesOf(layer.handle, prefix + mount));
    }
  }
  return out;
}
