// Placeholder until the tracks command lands; its owner replaces this file.
import type { Command } from 'commander';
import type { Io } from './io.js';

export function register(_program: Command, _io: Io): void {}
