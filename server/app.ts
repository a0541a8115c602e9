import fs from 'node:fs';
import path from 'node:path';
import cookieParser from 'cookie-parser';
import express, { type Express } from 'express';
import helmet from 'helmet';
import { pinoHttp } from 'pino-http';
import { authenticate, sameOriginWrites } from './auth/access';
import type { AppContext } from './context';
import { apiNotFound, errorHandler } from './http/errors';
import { jsonBody } from './http/json-body';
import { apiRouter } from './routes/index';

export const clientDist = path.resolve(import.meta.dirname, '../dist');

export interface AppOptions {
  /** Serve the built client from dist/ (default: when dist/index.html exists). */
  serveClient?: boolean;
}

/** Builds the Express app without listening, so tests can drive it with supertest. */
export function createApp(ctx: AppContext, options: AppOptions = {}): Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          'default-src': ["'self'"],
          'script-src': ["'self'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'object-src': ["'none'"],
          'frame-ancestors': ["'none'"],
          'upgrade-insecure-requests': ctx.config.env === 'production' ? [] : null,
        },
      },
      strictTransportSecurity: ctx.config.env === 'production',
    }),
  );
  if (ctx.config.env !== 'test')
    app.use(
      pinoHttp({
        logger: ctx.logger,
        autoLogging: { ignore: (req) => req.url === '/api/health' || !req.url?.startsWith('/api/') },
        serializers: {
          req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url }),
          res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
        },
      }),
    );
  app.use(cookieParser());

  const api = express.Router();
  api.use(sameOriginWrites);
  api.use(authenticate(ctx));
  api.use(jsonBody);
  api.use(apiRouter(ctx));
  api.use(apiNotFound);
  app.use('/api', api);

  const serveClient = options.serveClient ?? fs.existsSync(path.join(clientDist, 'index.html'));
  if (serveClient) {
    app.use(express.static(clientDist, { index: false, maxAge: '1h' }));
    app.get('/{*splat}', (_req, res) => {
      res.sendFile(path.join(clientDist, 'index.html'), { maxAge: 0 });
    });
  }

  app.use(errorHandler({ exposeStacks: ctx.config.env === 'development', logger: ctx.logger }));
  return app;
}
