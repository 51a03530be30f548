/**
 * zod compiles fast object parsers with `new Function` when it may, and probes for that with
 * `new Function("")`. The server's Content-Security-Policy forbids eval in the page (script-src
 * 'self'), so the probe would be reported as a violation. jitless tells zod to use its plain
 * parsers in the browser (zod documentation, "Configuration: jitless", meant for CSP pages).
 * Imported first by app/_layout.tsx, before any schema of shared/ is built.
 */
import { z } from 'zod';

z.config({ jitless: true });
