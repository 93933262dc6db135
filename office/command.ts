/**
 * The shape of one `shearfield` subcommand. Each lives in office/commands/
 * as its own file and default-exports a Command; cli.ts finds them there.
 */
export interface CommandIO {
  /** Writes to standard output (the command adds its own newlines). */
  out(text: string): void;
  /** Writes to standard error. */
  err(text: string): void;
}

export interface Command {
  /** The word after `shearfield`. */
  name: string;
  /** One line for the command list. */
  summary: string;
  /** The full `--help` text: usage, every option, defaults. */
  help: string;
  /** Runs the command; resolves to the exit code. Throw InputError for bad input. */
  run(args: string[], io: CommandIO): Promise<number>;
}
