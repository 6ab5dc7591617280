// Where the report's plotting library comes from: the installed plotly.js-dist-min bundle.
import { existsSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Source text of plotly.min.js, to be inlined into the report (no CDN, no network). */
export function loadPlotlySource(): string {
  const require = createRequire(import.meta.url);
  const path = require.resolve('plotly.js-dist-min/plotly.min.js');
  return readFileSync(path, 'utf8');
}

/**
 * A file of this package's build output (`dist/...`), found from here whether this module runs from source or
 * from dist: the nearest folder above that holds package.json and the file. Null when it was never built.
 */
export function builtFile(...parts: string[]): string | null {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let k = 0; k < 5; k++) {
    const file = join(dir, 'dist', ...parts);
    if (existsSync(join(dir, 'package.json')) && existsSync(file)) return file;
    dir = dirname(dir);
  }
  return null;
}

/**
 * Source text of the report's 3D view (ui/reportView.ts built by vite into dist/report-view), or null when
 * the page has not been built (the report then draws its 3D views with plotly).
 */
export function loadViewSource(): string | null {
  const file = builtFile('report-view', 'report-view.js');
  return file === null ? null : readFileSync(file, 'utf8');
}
