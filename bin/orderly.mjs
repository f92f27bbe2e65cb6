#!/usr/bin/env node
// `npx orderly ...`: the engine's command line. Node 20 cannot run TypeScript itself, so the
// entry registers tsx's loader and then imports the TypeScript command.
import { register } from 'tsx/esm/api';

register();
await import('../server/cli/orderly.ts');
