#!/usr/bin/env node
// Entry for `npx rungbook`: runs the TypeScript CLI through tsx so the checkout needs no build step.
import { register } from 'tsx/esm/api';
register();
const { main } = await import('../src/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
