// The local web server behind `thickring ui`: serves the built page (dist/ui, made by vite) and nothing
// else. Read-only: GET and HEAD only, no directory listing, and every path is resolved inside the page's
// folder (encoded dots and slashes, backslashes and absolute paths included) or answered 404.
import { readdirSync, readFileSync, statSync, mkdirSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { dirname, extname, join, resolve, sep } from 'node:path';
import { builtFile } from '../reports/plotlySource.js';

/** What the page opens first: a catalogue spec, or a file's name and text (already checked by the CLI). */
export type Preload = { kind: 'spec'; spec: string } | { kind: 'file'; name: string; text: string };

export interface UiServerOptions {
  /** Folder of the built page (default: dist/ui of this package). */
  root?: string;
  host: string;
  /** 0: a free port chosen by the system. */
  port: number;
  preload: Preload | null;
}

export interface UiServer {
  url: string;
  port: number;
  close(): Promise<void>;
}

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.wasm': 'application/wasm', '.json': 'application/json', '.png': 'image/png', '.svg': 'image/svg+xml',
};

/** The built page's folder; throws with the fix when the page was never built. */
export function pageRoot(): string {
  const index = builtFile('ui', 'index.html');
  if (index === null) throw new Error('the ui page is not built (dist/ui/index.html is missing): run npm run build');
  return dirname(index);
}

export async function startUiServer(options: UiServerOptions): Promise<UiServer> {
  const root = resolve(options.root ?? pageRoot());
  const index = pageHtml(root, options.preload);
  const server: Server = createServer((req, res) => {
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Cache-Control', 'no-store');
    if (req.method !== 'GET' && req.method !== 'HEAD') {
      res.writeHead(405, { Allow: 'GET, HEAD', 'Content-Type': 'text/plain; charset=utf-8' }).end('method not allowed\n');
      return;
    }
    const file = resolveInside(root, req.url ?? '/');
    if (file === null) {
      res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8' }).end('not found\n');
      return;
    }
    const body = file === join(root, 'index.html') ? Buffer.from(index) : readFileSync(file);
    res.writeHead(200, { 'Content-Type': TYPES[extname(file)] ?? 'application/octet-stream', 'Content-Length': body.length });
    res.end(req.method === 'HEAD' ? undefined : body);
  });
  await new Promise<void>((ok, fail) => {
    server.once('error', fail);
    server.listen(options.port, options.host, () => ok());
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : options.port;
  const shownHost = options.host.includes(':') ? `[${options.host}]` : options.host;
  return {
    url: `http://${shownHost}:${port}/`,
    port,
    close: () => new Promise<void>((ok) => {
      server.closeAllConnections();
      server.close(() => ok());
    }),
  };
}

/**
 * The file a request path names inside `root`, or null (404): undecodable or NUL-bearing paths, any
 * `..` segment (after decoding), backslashes, and anything that is not a regular file.
 */
export function resolveInside(root: string, rawUrl: string): string | null {
  const pathPart = rawUrl.split(/[?#]/)[0]!;
  let decoded: string;
  try {
    decoded = decodeURIComponent(pathPart);
  } catch {
    return null;
  }
  if (!decoded.startsWith('/') || decoded.includes('\0') || decoded.includes('\\')) return null;
  const segments = decoded.split('/').filter((s) => s !== '');
  if (segments.some((s) => s === '..' || s === '.')) return null;
  const rel = segments.length === 0 ? 'index.html' : segments.join(sep);
  const file = resolve(root, rel);
  if (!file.startsWith(root + sep)) return null;
  try {
    return statSync(file).isFile() ? file : null;
  } catch {
    return null;
  }
}

/** The built index.html with the preload embedded as inert JSON (text with `<` escaped). */
export function pageHtml(root: string, preload: Preload | null): string {
  const html = readFileSync(join(root, 'index.html'), 'utf8');
  if (!preload) return html;
  const json = JSON.stringify(preload).replace(/</g, '\\u003c').replace(/\u2028/g, '\\u2028').replace(/\u2029/g, '\\u2029');
  return html.replace('</head>', `<script id="preload" type="application/json">${json}</script>\n</head>`);
}

/** `--export DIR`: the page as static files (index.html with the preload, and its assets). */
export function exportPage(dir: string, preload: Preload | null, root = pageRoot()): string[] {
  const written: string[] = [];
  const copy = (from: string, to: string): void => {
    mkdirSync(to, { recursive: true });
    for (const name of readdirSync(from)) {
      const src = join(from, name);
      const dst = join(to, name);
      if (statSync(src).isDirectory()) copy(src, dst);
      else if (src === join(root, 'index.html')) {
        writeFileSync(dst, pageHtml(root, preload));
        written.push(dst);
      } else {
        writeFileSync(dst, readFileSync(src));
        written.push(dst);
      }
    }
  };
  copy(root, resolve(dir));
  return written;
}
