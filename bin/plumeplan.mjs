#!/usr/bin/env node
// Command-line entry: registers the TypeScript loader, then hands over to server/cli/main.ts.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../server/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
