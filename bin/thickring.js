#!/usr/bin/env node
// Thin launcher: the compiled CLI lives in dist/ (run `npm run build` first).
import { main } from '../dist/cli/main.js';
process.exitCode = await main(process.argv.slice(2));
