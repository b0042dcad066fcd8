/**
 * Security headers on every answer, the web app's and the API's (helmet):
 * a Content-Security-Policy the exported app runs under, no framing by any
 * page (clickjacking), no content sniffing, no referrer (an invite or reset
 * link's token is in its address), and API answers never stored by a cache.
 */
import helmet from 'helmet';
import type { RequestHandler } from 'express';

export function securityHeaders(secureApp: boolean): RequestHandler {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        baseUri: ["'self'"],
        // Compiling WebAssembly (a bundled library may) is allowed; eval and inline scripts are not.
        scriptSrc: ["'self'", "'wasm-unsafe-eval'"],
        scriptSrcAttr: ["'none'"],
        // react-native-web writes its style sheets and style attributes at run time.
        styleSrc: ["'self'", "'unsafe-inline'"],
        // three.js and the canvas hand images around as data: and blob: addresses.
        imgSrc: ["'self'", 'data:', 'blob:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'"],
        workerSrc: ["'self'", 'blob:'],
        manifestSrc: ["'self'"],
        objectSrc: ["'none'"],
        frameSrc: ["'none'"],
        frameAncestors: ["'none'"],
        formAction: ["'self'"],
      },
    },
    frameguard: { action: 'deny' },
    referrerPolicy: { policy: 'no-referrer' },
    // Only where the app is served over https; on plain http a browser ignores it anyway.
    strictTransportSecurity: secureApp ? { maxAge: 180 * 24 * 3600, includeSubDomains: false } : false,
    crossOriginResourcePolicy: { policy: 'same-origin' },
  });
}

/** API answers carry the caller's data: no shared or private cache keeps them (a route may say otherwise, as the immutable file download does). */
export const noStore: RequestHandler = (_req, res, next) => {
  res.setHeader('Cache-Control', 'no-store');
  next();
};
