/**
 * Benchmark of the web app's weight: what the sign-in page costs on a first visit, and the size of
 * every JavaScript chunk of the export (raw and gzip-compressed), measured two ways:
 *  - from the built files in dist/ (or WAVEFIT_BENCH_DIST): raw bytes and gzip at zlib's default level,
 *    the level the `compression` middleware uses;
 *  - from the real server (the browser harness: demo seeded, the web app served by serveWebApp) in
 *    Debian's chromium with an empty profile: the bytes of every response the sign-in page needed
 *    (headers + body as sent, i.e. after compression), and each chunk fetched with gzip accepted.
 * Targets (issue 19): first load of the sign-in page at most 600 kB transferred; the largest route
 * chunk at most 400 kB compressed. Figures are printed, never judged. Build the app first
 * (`npm run build:web`); this section does not build it.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { gzipSync } from 'node:zlib';
import { DIST, openBrowser, startServer } from '../tests/browser/harness';
import type { BenchSection } from './engine';

const kB = (bytes: number) => `${(bytes / 1000).toFixed(1)} kB`;

/**
 * The figures of the app before issue 19 (one bundle, no compression, 1 h cache), measured with this
 * section on 2 Dec 2026 against an export of commit 5a3639b served by that commit's server.
 */
export const BEFORE_ISSUE_19 = {
  signInTransferred: 3_115_200,
  signInRequests: 7,
  largestChunkRaw: 2_735_200,
  largestChunkGzip: 655_600,
  largestChunkSent: 2_735_200,
  chunks: 1,
};

function jsFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const name of readdirSync(d)) {
      const p = join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else if (name.endsWith('.js')) out.push(p);
    }
  };
  if (existsSync(dir)) walk(dir);
  return out;
}

export interface ChunkFigure {
  path: string;
  raw: number;
  gzip: number;
}

/** Every JavaScript file under dist/_expo/static/js, largest first, with its gzip size (zlib default level). */
export function chunkFigures(dist: string): ChunkFigure[] {
  return jsFiles(join(dist, '_expo', 'static', 'js'))
    .map((p) => {
      const body = readFileSync(p);
      return { path: '/' + relative(dist, p).split('\\').join('/'), raw: body.length, gzip: gzipSync(body).length };
    })
    .sort((a, b) => b.gzip - a.gzip);
}

export interface SignInLoad {
  requests: { url: string; status: number; sent: number; encoding: string | null }[];
  transferred: number;
}

/** Opens /sign-in in a fresh chromium profile and adds up what every response put on the wire. */
export async function measureSignIn(baseUrl: string): Promise<SignInLoad> {
  const b = await openBrowser('phone');
  try {
    const done: Promise<SignInLoad['requests'][number] | null>[] = [];
    b.page.on('requestfinished', (req) => {
      done.push(
        (async () => {
          const res = await req.response();
          if (!res) return null;
          const sizes = await req.sizes();
          return { url: req.url(), status: res.status(), sent: sizes.responseHeadersSize + sizes.responseBodySize, encoding: (await res.allHeaders())['content-encoding'] ?? null };
        })(),
      );
    });
    await b.page.goto(baseUrl + '/sign-in', { waitUntil: 'networkidle' });
    await b.page.getByRole('button', { name: 'Sign in', exact: true }).waitFor();
    await b.page.evaluate(() => document.fonts.ready.then(() => undefined));
    await b.page.waitForLoadState('networkidle');
    const requests = (await Promise.all(done)).filter((r): r is NonNullable<typeof r> => r !== null);
    return { requests, transferred: requests.reduce((s, r) => s + r.sent, 0) };
  } finally {
    await b.close();
  }
}

/** A chunk as the server sends it to a client that accepts gzip: body bytes and content-encoding. */
export async function fetchCompressed(url: string): Promise<{ bytes: number; encoding: string | null; cacheControl: string | null }> {
  // Node's fetch would decode the body; a raw http request counts the bytes as sent.
  const http = await import('node:http');
  return new Promise((ok, fail) => {
    http
      .get(url, { headers: { 'Accept-Encoding': 'gzip' } }, (res) => {
        let bytes = 0;
        res.on('data', (c: Buffer) => (bytes += c.length));
        res.on('end', () => ok({ bytes, encoding: (res.headers['content-encoding'] as string) ?? null, cacheControl: (res.headers['cache-control'] as string) ?? null }));
        res.on('error', fail);
      })
      .on('error', fail);
  });
}

export const webSections: BenchSection[] = [
  {
    name: 'web app weight (sign-in first load, route chunks)',
    async run(print) {
      const dist = process.env.WAVEFIT_BENCH_DIST ?? DIST;
      if (!existsSync(join(dist, 'index.html'))) {
        print(`skipped: no exported web app at ${dist} (run "npm run build:web" first)`);
        return;
      }
      const chunks = chunkFigures(dist);
      const server = await startServer(dist);
      try {
        const load = await measureSignIn(server.baseUrl);
        print(`sign-in page, first load in a fresh chromium profile: ${load.requests.length} responses, ${kB(load.transferred)} transferred (target at most 600 kB; before issue 19: ${BEFORE_ISSUE_19.signInRequests} responses, ${kB(BEFORE_ISSUE_19.signInTransferred)})`);
        for (const r of load.requests) print(`  ${kB(r.sent).padStart(10)}  ${r.status} ${r.encoding ?? 'identity'}  ${new URL(r.url).pathname}`);
        print(`JavaScript chunks in the export: ${chunks.length} (before issue 19: ${BEFORE_ISSUE_19.chunks})`);
        const top = chunks.slice(0, 8);
        for (const c of top) {
          const sent = await fetchCompressed(server.baseUrl + c.path);
          print(`  raw ${kB(c.raw).padStart(10)}  gzip ${kB(c.gzip).padStart(9)}  sent ${kB(sent.bytes).padStart(9)} (${sent.encoding ?? 'identity'}, ${sent.cacheControl ?? 'no cache header'})  ${c.path}`);
        }
        if (chunks.length > top.length) print(`  … and ${chunks.length - top.length} smaller chunks`);
        const largest = chunks[0];
        if (largest) {
          print(
            `largest chunk: ${kB(largest.raw)} raw, ${kB(largest.gzip)} gzip (target at most 400 kB compressed; before issue 19 one bundle of ${kB(BEFORE_ISSUE_19.largestChunkRaw)} raw, ${kB(BEFORE_ISSUE_19.largestChunkGzip)} gzip, sent uncompressed: ${kB(BEFORE_ISSUE_19.largestChunkSent)})`,
          );
        }
        const route = chunks.find((c) => !/\/(entry|__common|__expo-metro-runtime)-[0-9a-f]{32}\.js$/.test(c.path));
        if (route) print(`largest route chunk (not the entry or the shared chunk): ${kB(route.raw)} raw, ${kB(route.gzip)} gzip  ${route.path}`);
        print(`all chunks together: ${kB(chunks.reduce((s, c) => s + c.raw, 0))} raw, ${kB(chunks.reduce((s, c) => s + c.gzip, 0))} gzip`);
      } finally {
        await server.close();
      }
    },
  },
];
