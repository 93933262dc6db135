#!/usr/bin/env node
// The office command line. The TypeScript sources run through tsx, which is
// a runtime dependency, so `npx shearfield …` works right after npm install.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../office/cli.ts');
process.exitCode = await main(process.argv.slice(2));
