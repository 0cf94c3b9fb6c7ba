#!/usr/bin/env node
// The command-line entry point; the CLI itself is bin/cli.ts, compiled to dist/ on install.
import { main } from '../dist/bin/cli.js';

process.exitCode = await main(process.argv.slice(2));
