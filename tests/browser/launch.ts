// One way to start the Debian chromium the browser tests drive (playwright-core): a throw-away profile,
// headless, no network of its own, software WebGL (SwiftShader) so the 3D views draw without a GPU.
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium, type BrowserContext } from 'playwright-core';

export const CHROMIUM = '/usr/bin/chromium';

export interface Browser {
  context: BrowserContext;
  /** Closes the browser and removes its profile folder. */
  close(): Promise<void>;
}

export async function launchChromium(options: { width: number; height: number; acceptDownloads?: boolean }): Promise<Browser> {
  if (!existsSync(CHROMIUM)) {
    throw new Error(`${CHROMIUM} is missing: install it with 'apt-get install -y chromium' (.ci/run does)`);
  }
  const profile = mkdtempSync(join(tmpdir(), 'thickring-chromium-'));
  try {
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: options.width, height: options.height },
      acceptDownloads: options.acceptDownloads ?? false,
      args: [
        '--headless', '--no-sandbox', '--disable-background-networking', '--no-first-run',
        '--use-angle=swiftshader', '--enable-unsafe-swiftshader', '--disable-component-update', '--disable-sync',
      ],
    });
    return {
      context,
      async close() {
        await context.close();
        rmSync(profile, { recursive: true, force: true });
      },
    };
  } catch (e) {
    rmSync(profile, { recursive: true, force: true });
    throw e;
  }
}
