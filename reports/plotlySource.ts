// Where the report's plotting library comes from: the installed plotly.js-dist-min bundle.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';

/** Source text of plotly.min.js, to be inlined into the report (no CDN, no network). */
export function loadPlotlySource(): string {
  const require = createRequire(import.meta.url);
  const path = require.resolve('plotly.js-dist-min/plotly.min.js');
  return readFileSync(path, 'utf8');
}
