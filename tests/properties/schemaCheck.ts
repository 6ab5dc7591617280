// The published JSON Schemas (schemas/*.json) compiled with ajv (draft 2020-12), found from the project
// root so the fuzz families work from the sources and from dist/.
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Ajv2020 } from 'ajv/dist/2020.js';
import type { ValidateFunction } from 'ajv';

/** The folder holding package.json above this file (the project root, also when running from dist/). */
export function projectRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json'))) {
    const up = dirname(dir);
    if (up === dir) throw new Error('project root (package.json) not found');
    dir = up;
  }
  return dir;
}

const compiled = new Map<string, ValidateFunction>();

/** Validator of schemas/<name>.schema.json. */
export function schemaValidator(name: 'layout' | 'result' | 'tracks'): ValidateFunction {
  let v = compiled.get(name);
  if (!v) {
    const schema = JSON.parse(readFileSync(join(projectRoot(), 'schemas', `${name}.schema.json`), 'utf8')) as object;
    v = new Ajv2020({ allErrors: false, strict: false }).compile(schema);
    compiled.set(name, v);
  }
  return v;
}
