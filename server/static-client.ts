import path from 'node:path';
import compression from 'compression';
import express, { type Router } from 'express';

/** Vite writes its content-hashed files under /assets/: a new build gives them new names. */
const HASHED = /^\/assets\//;

export const IMMUTABLE = 'public, max-age=31536000, immutable';

/**
 * The built client: compressed (gzip or brotli, as the browser accepts), the
 * content-hashed assets cached for a year as immutable, and everything else
 * (index.html, the service worker, the manifest, icons) revalidated on every
 * use so a new build is picked up at once. Unknown paths answer index.html
 * for the client's own router.
 */
export function staticClient(dist: string): Router {
  const router = express.Router();
  router.use(compression());
  router.use(
    express.static(dist, {
      index: false,
      setHeaders(res, file) {
        const rel = `/${path.relative(dist, file).split(path.sep).join('/')}`;
        res.setHeader('Cache-Control', HASHED.test(rel) ? IMMUTABLE : 'no-cache');
      },
    }),
  );
  router.get('/{*splat}', (_req, res) => {
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(path.join(dist, 'index.html'));
  });
  return router;
}
