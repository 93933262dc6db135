#!/usr/bin/env node
// `npm run office`: the office server from the plain JavaScript build in build/office/, or from
// the TypeScript sources through tsx when they are newer (bin/launch.mjs).
import { load } from './launch.mjs';

const { runServerCommand } = await load('server');
const code = await runServerCommand(process.argv.slice(2));
if (code >= 0) process.exit(code);
