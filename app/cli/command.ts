// The shape of a CLI command, so groups of commands can live in their own files and join the
// `dipledger` command through the GROUPS list in main.ts.
import type { ParseArgsConfig } from 'node:util';
import type { Clock } from '../api/clock';
import type { OpenedLab } from '../api/open';

export interface CliIo {
  out(text: string): void;
  err(text: string): void;
  env: NodeJS.ProcessEnv;
  cwd: string;
  clock: Clock;
}

export interface CommandContext {
  io: CliIo;
  json: boolean;
  /** Parsed options (core and every group's). */
  values: Record<string, string | boolean | undefined>;
  /** Positional arguments after the command name. */
  rest: string[];
  dbFile: string;
  /** Prints JSON (with --json) or the text. */
  print(value: unknown, text: () => string): void;
  /** Opens the lab file (closed by the CLI when the command ends). */
  open(): OpenedLab;
  /** The first positional argument, or a usage error naming it. */
  arg(name: string): string;
}

/** Returns the exit code: 0 ok, 1 not a pass where asked, 2 bad input. Throw LabError for bad input. */
export type CommandHandler = (ctx: CommandContext) => Promise<number>;

export interface CommandGroup {
  /** Lines for the usage text, each starting with two spaces and ending with a newline. */
  usage: string;
  options: NonNullable<ParseArgsConfig['options']>;
  commands: Record<string, CommandHandler>;
  /** What `dipledger COMMAND --help` prints, per command (else the whole usage). */
  help?: Record<string, string>;
}
