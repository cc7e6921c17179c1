#!/usr/bin/env node
// Command-line entry: registers the TypeScript loader, then hands over to cli/main.ts.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
