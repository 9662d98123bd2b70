#!/usr/bin/env node
// The `veil` command: runs the TypeScript sources through tsx's loader (no build step needed).
import { register } from 'tsx/esm/api';

register();
await import('../main/cli-main.ts');
