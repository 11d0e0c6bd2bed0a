#!/usr/bin/env node
// The `lamella` command. It runs the TypeScript sources through tsx, so it
// works straight after `npm ci`, without a build.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
