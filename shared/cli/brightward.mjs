#!/usr/bin/env node
// Runs the TypeScript command line through tsx, wherever the package is installed.
import { register } from 'tsx/esm/api';

register();
await import(new URL('./main.ts', import.meta.url).href);
