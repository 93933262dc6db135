#!/usr/bin/env node
// The office command line. It runs the plain JavaScript build in build/office/ (made by npm ci and
// npm run build), or the TypeScript sources through tsx when they are newer (bin/launch.mjs).
import { load } from './launch.mjs';

const { main } = await load('cli');
process.exitCode = await main(process.argv.slice(2));
