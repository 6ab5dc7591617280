// `thickring ui [SPEC|LAYOUT|RESULT] [--port N] [--open] [--export DIR]`: the interactive page on a local
// server (cli/uiServer.ts) bound to 127.0.0.1, or written out as static files with --export.
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import type { Command } from 'commander';
import { looksLikeCatalogSpec, parseCatalogSpec } from '../src/model/catalog.js';
import { InputError } from '../src/model/errors.js';
import { isFile } from '../src/model/jsonFile.js';
import { parseLayout } from '../src/model/layout.js';
import { RESULT_FORMAT } from '../src/model/result.js';
import { parseResult } from '../src/model/resultFile.js';
import { checkHeld } from '../src/model/spec.js';
import { linkingMatrix } from '../src/topology/index.js';
import { emit, type Io } from './io.js';
import { exportPage, startUiServer, type Preload } from './uiServer.js';

const DEFAULT_HOST = '127.0.0.1';
const MAX_PORT = 65535;

export function register(program: Command, io: Io): void {
  program
    .command('ui')
    .description('Open the interactive page: move rings with a live check, inflate in the browser, download meshes (served on 127.0.0.1 only).')
    .argument('[spec|layout|result]', 'catalogue spec, layout file or result file to open first (default hopf)')
    .option('--port <n>', 'port to listen on (default: a free port)')
    .option('--host <address>', `address to bind (default ${DEFAULT_HOST}; anything else needs --allow-remote)`)
    .option('--allow-remote', 'allow a non-loopback --host (anyone who can reach it can use the page)')
    .option('--open', 'open the page in the system browser')
    .option('--export <dir>', 'write the page as static files to DIR instead of serving it')
    .option('--json', 'print one JSON object (the address, or the files written)')
    .action(async (arg: string | undefined, raw: Record<string, unknown>) => {
      const json = raw['json'] === true;
      const preload = arg === undefined ? null : readPreload(arg);
      const exportDir = raw['export'] as string | undefined;
      if (exportDir !== undefined) {
        const files = exportPage(exportDir, preload);
        emit(io, json, { export: exportDir, files: files.length }, () =>
          `thickring ui: wrote ${files.length} files to ${exportDir}; open ${exportDir}/index.html from disk or through any static file server`);
        return;
      }
      const host = raw['host'] === undefined ? DEFAULT_HOST : String(raw['host']).trim();
      if (!isLoopback(host)) {
        if (raw['allowRemote'] !== true) {
          throw new InputError(`--host: ${host} is not a loopback address; the page would be reachable from other machines: use 127.0.0.1, or add --allow-remote if you mean it`);
        }
        io.err(`thickring: warning: serving on ${host}: anyone who can reach this address can use the page (no authentication)`);
      }
      const port = raw['port'] === undefined ? 0 : portOf(raw['port']);
      let server;
      try {
        server = await startUiServer({ host, port, preload });
      } catch (e) {
        const code = (e as { code?: string }).code;
        if (code === 'EADDRINUSE') throw new InputError(`--port: ${port} is in use; choose another port or leave --port out for a free one`);
        if (code === 'EADDRNOTAVAIL' || code === 'ENOTFOUND') throw new InputError(`--host: ${host} is not an address of this machine; use 127.0.0.1`);
        throw e;
      }
      emit(io, json, { url: server.url }, () => `thickring ui: serving ${preload ? describe(preload) : 'hopf'} at ${server.url} (Ctrl-C to stop)`);
      if (raw['open'] === true) openBrowser(server.url, io);
      await new Promise<void>((done) => {
        const stop = (): void => {
          process.off('SIGINT', stop);
          process.off('SIGTERM', stop);
          void server.close().then(done);
        };
        process.once('SIGINT', stop);
        process.once('SIGTERM', stop);
      });
    });
}

/** Check the argument as the page will read it, so bad input fails here with exit code 2. */
export function readPreload(arg: string): Preload {
  const text = arg.trim();
  if (looksLikeCatalogSpec(text) && !isFile(text)) return { kind: 'spec', spec: parseCatalogSpec(text).text };
  if (!isFile(text)) {
    if (/^[a-z]+(:\S*)?$/i.test(text)) parseCatalogSpec(text);
    throw new InputError(`file '${text}' does not exist: give a catalogue spec (thickring catalog), a layout file or a result file`);
  }
  const name = basename(text);
  let body: string;
  try {
    body = readFileSync(text, 'utf8');
  } catch {
    throw new InputError(`file '${text}' cannot be read: check the path and permissions`);
  }
  let data: unknown;
  try {
    data = JSON.parse(body);
  } catch (e) {
    throw new InputError(`file '${text}' is not valid JSON (${e instanceof Error ? e.message : String(e)}): fix the syntax`);
  }
  if (data !== null && typeof data === 'object' && (data as { format?: unknown }).format === RESULT_FORMAT) {
    const r = parseResult(data, name);
    if (r.lattice) throw new InputError(`result file '${text}' is a periodic weave, which the page does not edit: use thickring report for it`);
  } else {
    const layout = parseLayout(data, name);
    if (layout.lattice) throw new InputError(`layout file '${text}' has a lattice (a periodic weave), which only thickring inflate and compare read: remove "lattice" and list the rings`);
    checkHeld(linkingMatrix(layout.rings), layout, name);
  }
  return { kind: 'file', name, text: body };
}

export function isLoopback(host: string): boolean {
  const h = host.replace(/^\[|\]$/g, '').toLowerCase();
  return h === 'localhost' || h === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(h);
}

function portOf(v: unknown): number {
  const text = String(v).trim();
  const n = Number(text);
  if (!/^\d+$/.test(text) || n < 1 || n > MAX_PORT) throw new InputError(`--port: ${text} must be a whole number from 1 to ${MAX_PORT} (for example --port 8080), or leave it out for a free port`);
  return n;
}

function describe(p: Preload): string {
  return p.kind === 'spec' ? p.spec : p.name;
}


/** Best effort: the page's address is printed either way. */
function openBrowser(url: string, io: Io): void {
  const cmd = process.platform === 'darwin' ? 'open' : process.platform === 'win32' ? 'explorer' : 'xdg-open';
  try {
    const child = spawn(cmd, [url], { stdio: 'ignore', detached: true });
    child.on('error', () => io.err(`thickring: could not start ${cmd}; open ${url} yourself`));
    child.unref();
  } catch {
    io.err(`thickring: could not start ${cmd}; open ${url} yourself`);
  }
}
