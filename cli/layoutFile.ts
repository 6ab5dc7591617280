// Read a layout file from disk: JSON syntax errors and layout errors both become InputError (exit 2).
import { basename } from 'node:path';
import { parseLayout } from '../src/model/layout.js';
import type { Layout } from '../src/model/types.js';
import { readJsonFile } from './files.js';

export function loadLayoutFile(path: string): Layout {
  return parseLayout(readJsonFile(path, 'layout'), basename(path));
}
