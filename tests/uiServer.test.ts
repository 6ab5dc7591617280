// The `thickring ui` server: it serves only the page's own files. Every way of naming a file outside the
// page's folder gets 404: literal and percent-encoded dot segments, encoded slashes and backslashes, and
// absolute paths. Outside reference: RFC 3986 section 3.3 / 5.2.4 (dot segments "." and ".." in a path and
// their percent-encoded forms %2E%2E, %2F) and the OWASP "Path Traversal" attack page (encoded variants).
import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';
import { pageHtml, startUiServer, type UiServer } from '../cli/uiServer.js';

function get(port: number, path: string, method = 'GET'): Promise<{ status: number; body: string }> {
  // node:http sends the path as given (no normalisation, unlike fetch/URL), which is what an attacker sends.
  return new Promise((ok, fail) => {
    const req = request({ host: '127.0.0.1', port, path, method }, (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (c: string) => (body += c));
      res.on('end', () => ok({ status: res.statusCode ?? 0, body }));
    });
    req.on('error', fail);
    req.end();
  });
}

describe('ui server', () => {
  let base: string;
  let root: string;
  let server: UiServer;
  const SECRET = 'secret-outside-the-page';

  beforeAll(async () => {
    base = mkdtempSync(join(tmpdir(), 'thickring-ui-'));
    root = join(base, 'page');
    mkdirSync(join(root, 'assets'), { recursive: true });
    writeFileSync(join(root, 'index.html'), '<!doctype html><html><head><title>t</title></head><body>page</body></html>');
    writeFileSync(join(root, 'assets', 'app.js'), 'console.log(1)');
    writeFileSync(join(base, 'package.json'), SECRET);
    writeFileSync(join(base, 'secret.txt'), SECRET);
    server = await startUiServer({ root, host: '127.0.0.1', port: 0, preload: { kind: 'spec', spec: 'chain:3' } });
  });

  afterAll(async () => {
    await server?.close();
    rmSync(base, { recursive: true, force: true });
  });

  it('serves the page, its assets and the preload', async () => {
    expect(server.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    const page = await get(server.port, '/');
    expect(page.status).toBe(200);
    expect(page.body).toContain('"spec":"chain:3"');
    expect((await get(server.port, '/assets/app.js')).status).toBe(200);
  });

  const attacks = [
    '/../package.json', '/../secret.txt', '/assets/../../secret.txt', '/%2e%2e/secret.txt', '/%2E%2E/package.json',
    '/%2e%2e%2fsecret.txt', '/..%2fsecret.txt', '/assets%2f..%2f..%2fsecret.txt', '/%2e%2e%5csecret.txt', '/..\\secret.txt',
    '/%252e%252e/secret.txt', '/%c0%ae%c0%ae/secret.txt', '/assets/%00app.js',
  ];
  for (const path of attacks) {
    it(`404 for ${path}`, async () => {
      const r = await get(server.port, path);
      expect(r.status).toBe(404);
      expect(r.body).not.toContain(SECRET);
    });
  }

  it('404 for absolute paths and directories (no listing), 405 for writes', async () => {
    for (const path of [join(base, 'secret.txt'), `/${join(base, 'secret.txt')}`, encodeURIComponent(join(base, 'secret.txt')), '/assets', '/assets/']) {
      const r = await get(server.port, path.startsWith('/') ? path : `/${path}`);
      expect(r.status, path).toBe(404);
      expect(r.body).not.toContain(SECRET);
    }
    expect((await get(server.port, '/index.html', 'PUT')).status).toBe(405);
    expect((await get(server.port, '/x.txt', 'POST')).status).toBe(405);
  });

  it('embeds the preload as inert JSON even when a file text holds markup', () => {
    const html = pageHtml(root, { kind: 'file', name: 'a.json', text: '</script><script>alert(1)</script>' });
    expect(html).not.toContain('</script><script>alert(1)');
  });
});

describe('thickring ui command', () => {
  it('refuses a non-loopback --host without --allow-remote (exit code 2, nothing served)', async () => {
    const out: string[] = [];
    const err: string[] = [];
    const io: Io = { out: (t) => out.push(t), err: (t) => err.push(t), interactive: false };
    expect(await main(['ui', '--host', '0.0.0.0'], io)).toBe(2);
    expect(err.join('')).toMatch(/--host: 0\.0\.0\.0 is not a loopback address.*--allow-remote/);
    expect(out).toHaveLength(0);
    expect(await main(['ui', '--host', '192.168.1.20', '--json'], io)).toBe(2);
  });

  it('refuses a bad port and a missing file with one line (exit code 2)', async () => {
    const err: string[] = [];
    const io: Io = { out: () => {}, err: (t) => err.push(t), interactive: false };
    expect(await main(['ui', '--port', '70000'], io)).toBe(2);
    expect(await main(['ui', 'no-such-layout.json'], io)).toBe(2);
    expect(err).toHaveLength(2);
    for (const line of err) expect(line.trim().split('\n')).toHaveLength(1);
  });

  it('with --allow-remote warns, serves, and ends cleanly on Ctrl-C (SIGINT)', async () => {
    const cli = resolve('cli/main.ts');
    const script = `import(${JSON.stringify(cli)}).then(async (m) => { process.exitCode = await m.main(['ui', 'hopf', '--host', '0.0.0.0', '--allow-remote']); });`;
    const child = spawn(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (c: Buffer) => (stdout += c.toString()));
    child.stderr.on('data', (c: Buffer) => (stderr += c.toString()));
    const started = await new Promise<boolean>((ok) => {
      const t = setInterval(() => { if (/http:\/\/\S+/.test(stdout)) { clearInterval(t); ok(true); } }, 100);
      child.on('exit', () => { clearInterval(t); ok(false); });
    });
    expect(started, stderr).toBe(true);
    expect(stderr).toMatch(/warning: serving on 0\.0\.0\.0/);
    const port = Number(/:(\d+)\//.exec(stdout)![1]);
    expect((await get(port, '/')).status).toBe(200);
    const code = await new Promise<number | null>((ok) => {
      child.on('exit', (c) => ok(c));
      child.kill('SIGINT');
    });
    expect(code).toBe(0);
  });
});

describe('thickring ui --export', () => {
  it('writes the built page with the preload, and the copy serves like the original', async () => {
    const out = mkdtempSync(join(tmpdir(), 'thickring-ui-export-'));
    try {
      const err: string[] = [];
      const lines: string[] = [];
      const io: Io = { out: (t) => lines.push(t), err: (t) => err.push(t), interactive: false };
      expect(await main(['ui', 'chain:3', '--export', out, '--json'], io), err.join('')).toBe(0);
      const printed = JSON.parse(lines.join('')) as { files: number };
      expect(printed.files).toBeGreaterThan(3);
      const server = await startUiServer({ root: out, host: '127.0.0.1', port: 0, preload: null });
      try {
        const page = await get(server.port, '/');
        expect(page.status).toBe(200);
        expect(page.body).toContain('"spec":"chain:3"');
        const script = /src="\.\/(assets\/[^"]+\.js)"/.exec(page.body)?.[1];
        expect(script).toBeDefined();
        expect((await get(server.port, `/${script}`)).status).toBe(200);
      } finally {
        await server.close();
      }
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  });
});
