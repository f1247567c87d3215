import type { RequestHandler } from 'express';
import helmet from 'helmet';

/**
 * Security headers on every response. The CSP allows no inline script (the app build does not inline
 * critical CSS, whose loader is an inline handler); inline styles stay allowed because Angular and the
 * chart library set them at run time. HSTS only on a request that came over TLS (req.secure, which
 * follows TRUST_PROXY behind a TLS reverse proxy): on plain HTTP it would be meaningless.
 */
export function securityHeaders(): RequestHandler[] {
  const hsts = helmet.strictTransportSecurity({ maxAge: 180 * 24 * 3600 });
  return [
    helmet({
      contentSecurityPolicy: {
        useDefaults: false,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          scriptSrcAttr: ["'none'"],
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
        },
      },
      referrerPolicy: { policy: 'no-referrer' },
      strictTransportSecurity: false,
      xFrameOptions: { action: 'deny' },
    }),
    (req, res, next) => (req.secure ? hsts(req, res, next) : next()),
  ];
}

/** Names of build output with a content hash (main-WOEICJMN.js, chunk-34477KXJ.js, media/x-H2PCDJ6E.woff2). */
export const HASHED_ASSET = /-[A-Z0-9]{8}\.[a-z0-9]+$/;
