#!/usr/bin/env node
// `npm start`: see main/launcher.ts.
import { register } from 'tsx/esm/api';

register();
await import('../main/launcher.ts');
