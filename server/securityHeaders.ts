/**
 * Security headers for the API and the web app, through helmet (OWASP HTTP Headers Cheat Sheet,
 * OWASP Content Security Policy Cheat Sheet):
 * - Content-Security-Policy: everything from this origin only; no plugins; no framing
 *   (frame-ancestors 'none'); forms and <base> to this origin. Styles need 'unsafe-inline': the
 *   exported app has an inline reset <style> in index.html and react-native-web writes its styles
 *   into <style> elements at run time. Scripts need nothing inline (the export loads one bundle
 *   file), so script-src stays 'self'. Images may be data: or blob: URLs (charts, downloads).
 * - Referrer-Policy: no-referrer, so an invitation link (/invite/<token>) never leaks to anyone.
 * - Strict-Transport-Security: only on requests that arrived over HTTPS (directly or, with
 *   TRUST_PROXY, through a proxy that says so); over plain HTTP a browser would ignore it anyway.
 *   upgrade-insecure-requests likewise only when the public address is https.
 * - helmet's other defaults: X-Content-Type-Options nosniff, X-Frame-Options SAMEORIGIN (older
 *   browsers), Cross-Origin-Opener-Policy and Cross-Origin-Resource-Policy same-origin, no
 *   X-Powered-By.
 */
import type { RequestHandler } from 'express';
import helmet from 'helmet';
import type { Config } from './config';

/** One year, common practice for HSTS. */
const HSTS_SECONDS = 365 * 24 * 60 * 60;

export function securityHeaders(config: Pick<Config, 'publicUrl'>): RequestHandler[] {
  const https = config.publicUrl.startsWith('https://');
  const headers = helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        'default-src': ["'self'"],
        'script-src': ["'self'"],
        'style-src': ["'self'", "'unsafe-inline'"],
        'font-src': ["'self'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        'connect-src': ["'self'"],
        'object-src': ["'none'"],
        'base-uri': ["'self'"],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        'script-src-attr': ["'none'"],
        ...(https ? { 'upgrade-insecure-requests': [] } : {}),
      },
    },
    referrerPolicy: { policy: 'no-referrer' },
    strictTransportSecurity: false,
  });
  const hsts = helmet.strictTransportSecurity({ maxAge: HSTS_SECONDS, includeSubDomains: true });
  const hstsOverHttps: RequestHandler = (req, res, next) => (req.secure ? hsts(req, res, next) : next());
  return [headers, hstsOverHttps];
}
