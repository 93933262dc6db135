/**
 * `shearfield`: the office command line. Dispatches to the subcommands in
 * office/commands/, turns bad input into a one-line message on stderr and a
 * non-zero exit, and never prints a stack trace for an input error.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, extname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { InputError } from '../core/shared/errors';
import type { Command, CommandIO } from './command';
import { busyMessage, isBusyError } from './store-busy';

// The commands sit beside this file: office/commands/*.ts, or build/office/commands/*.js in the build (scripts/build-office.mjs).
const here = fileURLToPath(import.meta.url);
const commandsDir = join(dirname(here), 'commands');
const commandExt = extname(here) === '.js' ? '.js' : '.ts';

/** A command as the dispatcher knows it before loading it: its name, its summary and how to load it. */
interface CommandEntry {
  name: string;
  summary: string;
  load(): Promise<Command>;
}

async function importCommand(file: string): Promise<Command | undefined> {
  const mod = (await import(pathToFileURL(join(commandsDir, file)).href)) as { default?: Command };
  return mod.default;
}

/**
 * Every command. The build (scripts/build-office.mjs) writes commands.json
 * with each command's name and summary, so that the list and one command's
 * run load only that command; from the sources every file is imported.
 */
async function loadCommands(): Promise<CommandEntry[]> {
  const manifest = join(dirname(here), 'commands.json');
  if (commandExt === '.js' && existsSync(manifest)) {
    const listed = JSON.parse(readFileSync(manifest, 'utf8')) as { name: string; summary: string; file: string }[];
    return listed.map((c) => ({
      name: c.name,
      summary: c.summary,
      load: async () => {
        const command = await importCommand(c.file);
        if (!command) throw new Error(`The built command file ${c.file} has no command; run npm run build again.`);
        return command;
      },
    }));
  }
  const files = readdirSync(commandsDir)
    .filter((f) => f.endsWith(commandExt) && !f.endsWith('.d.ts'))
    .sort();
  const commands: CommandEntry[] = [];
  for (const f of files) {
    const command = await importCommand(f);
    if (command) commands.push({ name: command.name, summary: command.summary, load: async () => command });
  }
  return commands;
}

function usage(commands: CommandEntry[]): string {
  const width = Math.max(...commands.map((c) => c.name.length));
  return [
    'Usage: shearfield <command> [options]',
    '',
    'Commands:',
    ...commands.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`),
    '',
    'Run `shearfield <command> --help` for the options of one command.',
  ].join('\n');
}

const processIO: CommandIO = {
  out: (text) => process.stdout.write(text),
  err: (text) => process.stderr.write(text),
};

const FS_REASONS: Readonly<Record<string, string>> = {
  ENOENT: 'it, or a folder above it, does not exist',
  ENOTDIR: 'a part of that path is a file, not a folder',
  EISDIR: 'it is a folder, not a file',
  EEXIST: 'a file of that name is in the way',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  EROFS: 'the disk is read-only',
  ENOSPC: 'the disk is full',
};

/** A one-sentence message naming the path for a Node file-system error, or undefined for any other error. */
function fileSystemMessage(e: unknown): string | undefined {
  const { code, path, syscall } = e as { code?: unknown; path?: unknown; syscall?: unknown };
  if (typeof code !== 'string' || typeof path !== 'string' || !(code in FS_REASONS)) return undefined;
  const what = syscall === 'mkdir' ? 'create the folder' : syscall === 'open' ? 'open the file' : `${String(syscall ?? 'use')}`;
  return `Could not ${what} "${path}": ${FS_REASONS[code]}.`;
}

/**
 * A full sentence naming the option for node:util parseArgs's terser
 * messages (a missing value, a value that starts with "-", a value given to
 * a switch, an unknown option); any other message keeps its first line.
 */
function optionMessage(message: string, command: string): string {
  let m = /^Option '(--?[\w-]+)(?: <value>)?' argument missing/.exec(message);
  if (m) return `${m[1]} needs a value, but none was given.`;
  m = /^Option '(--?[\w-]+)' argument is ambiguous/.exec(message);
  if (m) return `${m[1]} needs a value, but the next word starts with "-"; to give a value that starts with "-", write ${m[1]}=VALUE.`;
  m = /^Option '(--?[\w-]+)' does not take an argument/.exec(message);
  if (m) return `${m[1]} is a switch and takes no value; give it alone.`;
  m = /^Unknown option '([^']+)'/.exec(message);
  if (m) return `Unknown option '${m[1]}'. See shearfield ${command} --help for the options.`;
  return message.split('\n')[0];
}

/** Runs the command line; returns the exit code (0 ok, 1 bad input, 2 usage, 3 internal error). */
export async function main(argv: string[], io: CommandIO = processIO): Promise<number> {
  const commands = await loadCommands();
  const [name, ...rest] = argv;
  if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
    io.out(usage(commands) + '\n');
    return name === undefined ? 2 : 0;
  }
  const entry = commands.find((c) => c.name === name);
  if (!entry) {
    io.err(`shearfield: unknown command "${name}". Commands: ${commands.map((c) => c.name).join(', ')}.\n`);
    return 2;
  }
  const command = await entry.load();
  if (rest.includes('--help') || rest.includes('-h')) {
    io.out(command.help.trimEnd() + '\n');
    return 0;
  }
  try {
    return await command.run(rest, io);
  } catch (e) {
    if (e instanceof InputError) {
      io.err(`shearfield ${name}: ${e.message.replace(/\s*\n\s*/g, ' ')}\n`);
      return 1;
    }
    // A file or folder the command could not write or open (an output path
    // in a missing folder, a file where a folder should be …) is bad input.
    const fsMessage = fileSystemMessage(e);
    if (fsMessage) {
      io.err(`shearfield ${name}: ${fsMessage}\n`);
      return 1;
    }
    // Another writer kept the store locked past the busy timeout: nothing was written by the failed step.
    if (isBusyError(e)) {
      io.err(`shearfield ${name}: ${busyMessage()}\n`);
      return 1;
    }
    // Option-parser errors (node:util parseArgs) are usage errors.
    const code = (e as { code?: string }).code;
    if (typeof code === 'string' && code.startsWith('ERR_PARSE_ARGS')) {
      io.err(`shearfield ${name}: ${optionMessage((e as Error).message, name)}\n`);
      return 2;
    }
    io.err(`shearfield ${name}: internal error: ${(e as Error).message.split('\n')[0]}\n`);
    return 3;
  }
}
