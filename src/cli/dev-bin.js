#!/usr/bin/env node
// Runs the CLI from the TypeScript sources (tests and development); the installed `phosledger`
// command runs the compiled copy under dist/ instead (`npm run build`).
import { register } from 'tsx/esm/api';

register();
await import('./bin.ts');
