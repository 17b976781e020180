#!/usr/bin/env node
// The `aislewright` command: runs the TypeScript entry through tsx's loader, no build step.
import { register } from 'tsx/esm/api';

register();
await import('./main.ts');
