// The `dipledger` command: a thin shell over the LabApi. Parses arguments, calls one
// operation, prints a table or JSON (SI units). Exit codes: 0 ok, 1 a verdict that is not a
// pass where --require-pass asks, 2 bad input (nothing written), 3 an internal fault.
import { existsSync, writeFileSync } from 'node:fs';
import { homedir } from 'node:os';
import path from 'node:path';
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { LabError } from '../api/errors';
import { encodeJson } from '../model/json';
import { messageForPeople } from '../model/field-labels';
import { decimal, machineValues } from '../model/quantity-format';
import { openApi, type OpenedLab } from '../api/open';
import { systemClock, fixedClock } from '../api/service';
import { StoreError } from '../../db/store';
import { readTextFile } from './read-text';
import { formatFrequency } from '../engine';
import { labFilePath } from '../../db/lab-file';
import { createLabFile } from '../../sample-lab/load';
import type { CliIo, CommandContext, CommandGroup } from './command';
import { historyCommands } from './commands-history';
import { documentCommands } from './commands-documents';
import { dccCommands } from './commands-dcc';
import { impactCommands } from './commands-impact';
import { recordsCommands } from './commands-records';
import { labCommands, meterRevisionsText } from './commands-lab';
import { resolveBudgetSweepFile, resolveSweepFiles, sweepCommands } from './commands-sweep';
import packageJson from '../../package.json' with { type: 'json' };
import {
  UsageError,
  band,
  budgetText,
  checkText,
  dueWords,
  fmtPpm,
  numberOption,
  readJsonFile,
  registerTable,
  table,
  verdictWord,
} from './format';

export type { CliIo } from './command';

/** Command groups from other files (sweeps, history, records...) join the core commands here. */
const GROUPS: CommandGroup[] = [
  historyCommands,
  recordsCommands,
  documentCommands,
  sweepCommands,
  dccCommands,
  impactCommands,
  labCommands,
];

const CORE_OPTIONS: NonNullable<ParseArgsConfig['options']> = {
  db: { type: 'string' },
  json: { type: 'boolean', default: false },
  sample: { type: 'boolean', default: false },
  name: { type: 'string' },
  within: { type: 'string' },
  temp: { type: 'string' },
  rh: { type: 'string' },
  pressure: { type: 'string' },
  out: { type: 'string' },
  port: { type: 'string' },
  'require-pass': { type: 'boolean', default: false },
  help: { type: 'boolean', short: 'h', default: false },
  version: { type: 'boolean', default: false },
};

/** The commands of the switch in runCli; the groups' commands are the keys of their handlers. */
const CORE_COMMANDS = ['init', 'refs', 'due', 'show', 'record', 'budget', 'air', 'import', 'export', 'serve'];

/** Every command `dipledger` answers. */
export function commandNames(): string[] {
  return [...CORE_COMMANDS, ...GROUPS.flatMap((g) => Object.keys(g.commands))];
}

const CORE_USAGE = `dipledger: calibration records for cavity frequency meters

usage: dipledger [--db FILE] [--json] COMMAND [ARGS]
       dipledger COMMAND --help          what one command does
       dipledger --version

  init [--sample] [--name NAME]      create a lab file, optionally with the demo lab
  refs                               the register: every meter, band, state, due date
  due [--within DAYS]                meters due within DAYS (default 30) or overdue
  show REF                           one meter: identity, state, due date, history
  record FILE.json [--require-pass]  record a check from an exchange document
  budget FILE.json [--require-pass]  one point's uncertainty budget and decision
  air --temp C --rh PCT --pressure HPA   refractivity N, index n, shift vs reference air
  import FILE.csv                    bulk history in (all or nothing)
  export [--out FILE.csv]            bulk history out
  serve [--port N]                   the UI in a browser on 127.0.0.1
%GROUPS%
  --db FILE   the lab file (default: $DIPLEDGER_DB or the user's data folder)
  --json      machine-readable output in SI units (Hz, ppm, degC, hPa)

Frequencies take units: 9.3GHz, "9300 MHz", 9.3e9. Exit codes: 0 ok, 1 not a pass
where --require-pass asks, 2 bad input (nothing written), 4 the lab file is busy with
another write (nothing written; try again).
Verdicts support, and never replace, the lab's quality system and accredited practice.`;

export function usage(): string {
  return CORE_USAGE.replace('%GROUPS%', GROUPS.map((g) => g.usage).join(''));
}

const GLOBAL_OPTIONS_HELP = `  --db FILE   the lab file (default: $DIPLEDGER_DB or the user's data folder)
  --json      machine-readable output in SI units (Hz, ppm, degC, hPa)
Exit codes: 0 ok, 1 not a pass where --require-pass asks, 2 bad input (nothing written).`;

/** The usage entry of one command (its line in the usage text and the lines continuing it),
 * or undefined for a command that has none. */
export function commandHelp(command: string): string | undefined {
  const lines = usage().split('\n');
  const start = lines.findIndex(
    (l) => /^ {2}\S/.test(l) && l.trim().split(/\s/)[0]!.split('|').includes(command),
  );
  if (start < 0) return undefined;
  let end = start + 1;
  while (end < lines.length && /^ {6,}\S/.test(lines[end]!)) end++;
  // "  synopsis   description" then description lines indented to the description column.
  // A long synopsis continues on the next lines with its options in brackets.
  const [synopsis, ...first] = lines[start]!.trim().split(/ {2,}/);
  const more = lines.slice(start + 1, end).map((l) => l.trim());
  const optionLines = first.length ? 0 : more.findIndex((l) => !l.startsWith('['));
  const options = more.splice(0, optionLines < 0 ? more.length : optionLines);
  const description = [first.join(' '), ...more].filter((l) => l);
  return [
    `usage: dipledger [--db FILE] [--json] ${[synopsis, ...options].join(' ')}`,
    '',
    ...description.map((l) => `  ${l}`),
    '',
    GLOBAL_OPTIONS_HELP,
  ].join('\n');
}

/** Runs one command line; returns the exit code. Never throws. */
export async function runCli(argv: string[], io: CliIo): Promise<number> {
  let opened: OpenedLab | undefined;
  let json = false;
  try {
    const options = { ...CORE_OPTIONS };
    for (const g of GROUPS) Object.assign(options, g.options);
    const parsed = parseArgs({ args: argv, allowPositionals: true, strict: true, options });
    const values = parsed.values as Record<string, string | boolean | undefined> & {
      db?: string;
      json: boolean;
      sample: boolean;
      name?: string;
      within?: string;
      temp?: string;
      rh?: string;
      pressure?: string;
      out?: string;
      port?: string;
      'require-pass': boolean;
      help: boolean;
      version: boolean;
    };
    json = values.json;
    const [command, ...rest] = parsed.positionals;
    if (values.version) {
      io.out(`dipledger ${packageJson.version}`);
      return 0;
    }
    if (values.help && command) {
      // A group's own help for a command with subcommands, else the command's usage lines.
      const own = GROUPS.find((g) => g.help?.[command])?.help?.[command];
      const help = own === undefined ? commandHelp(command) : `${own.trimEnd()}\n\n${GLOBAL_OPTIONS_HELP}`;
      if (help === undefined) throw new UsageError(`unknown command "${command}"`);
      io.out(help);
      return 0;
    }
    if (values.help || !command) {
      io.out(usage());
      return values.help ? 0 : 2;
    }
    const dbFile = values.db
      ? path.resolve(io.cwd, values.db)
      : labFilePath(io.env, process.platform, homedir());
    // JSON numbers in SI units at 15 significant digits: no float noise, nothing measured lost
    // (docs/exchange.md, "Numbers in --json output").
    const print = (value: unknown, text: () => string) =>
      io.out(json ? encodeJson(machineValues(value), 2) : text());
    const open = () => (opened = openApi(dbFile, { clock: io.clock, actor: io.env.USER ?? 'cli' }));
    const arg = (name: string) => {
      const v = rest[0];
      if (!v) throw new UsageError(`${command} needs ${name}`);
      return v;
    };

    const grouped = GROUPS.find((g) => command in g.commands)?.commands[command];
    if (grouped) {
      const ctx: CommandContext = { io, json, values, rest, dbFile, print, open, arg };
      return await grouped(ctx);
    }

    switch (command) {
      case 'init': {
        await createLabFile(dbFile, values.sample, { clock: io.clock, name: values.name });
        const lab = open();
        const rows = await lab.api.listMeters();
        print(
          { file: dbFile, meters: rows.length },
          () => `created ${dbFile}${values.sample ? ` with the demo lab (${rows.length} meters)` : ''}`,
        );
        return 0;
      }
      case 'refs': {
        const rows = await open().api.listMeters();
        print(rows, () => registerTable(rows));
        return 0;
      }
      case 'due': {
        const within = numberOption('within', values.within, false) ?? 30;
        const rows = await open().api.listDue({ withinDays: within });
        print(rows, () => (rows.length ? registerTable(rows) : `nothing due within ${within} days`));
        return 0;
      }
      case 'show': {
        const detail = await open().api.getMeter(arg('REF'));
        print(detail, () => {
          const m = detail.meter;
          const r = detail.register;
          const lines = [
            `${m.assetId}  ${m.description}`,
            `${m.construction} ${m.port}, ${band(m)}, ${m.dialKind === 'direct' ? 'direct-reading dial' : 'micrometer in divisions with a chart'}`,
            `stated accuracy ${m.accuracyRelPpm} ppm of reading${m.accuracyAbsHz ? ` + ${formatFrequency(m.accuracyAbsHz, 3)}` : ''}; loaded Q ${m.loadedQ}; max input ${m.maxInputPowerW} W`,
            `state ${m.state}; interval ${m.intervalMonths} months; last check ${r.lastCheckDate ?? '-'}; due ${r.dueDate ?? '-'} (${dueWords(r)})`,
            `location ${m.location || '-'}`,
            meterRevisionsText(detail),
            '',
            table(
              ['check', 'rev', 'date', 'performer', 'as found', 'as left', 'worst'],
              detail.checks.map((c) => [
                String(c.checkId),
                String(c.revision),
                c.date,
                c.performer,
                verdictWord(c.asFoundVerdict),
                verdictWord(c.asLeftVerdict),
                c.worstUsedFraction === null ? '-' : `${decimal(c.worstUsedFraction * 100, 0)} % of tol.`,
              ]),
              [0, 1, 6],
            ),
          ];
          return lines.join('\n');
        });
        return 0;
      }
      case 'record': {
        // Trace files named by swept points are read here, beside the document (issue 3).
        const docFile = arg('FILE.json');
        const doc = resolveSweepFiles(
          readJsonFile(docFile, io.cwd),
          path.dirname(path.resolve(io.cwd, docFile)),
        );
        const rec = await open().api.recordCheck(doc as never);
        print(rec, () => checkText(rec));
        return values['require-pass'] && rec.asLeftVerdict !== 'pass' ? 1 : 0;
      }
      case 'budget': {
        // A swept point's trace file is read here, beside the document, as for `record`.
        const docFile = arg('FILE.json');
        const doc = resolveBudgetSweepFile(
          readJsonFile(docFile, io.cwd),
          path.dirname(path.resolve(io.cwd, docFile)),
        );
        const res = await open().api.evaluateBudget(doc as never);
        const ref = (doc as { reference?: unknown }).reference;
        print(res, () => budgetText(res, res.correctedHz - res.errorHz) + (ref ? '' : ''));
        return values['require-pass'] && res.decision.verdict !== 'pass' ? 1 : 0;
      }
      case 'air': {
        const input = {
          temperatureC: numberOption('temp', values.temp, true),
          humidityPct: numberOption('rh', values.rh, true),
          pressureHpa: numberOption('pressure', values.pressure, true),
        };
        // Pure computation: a lab file is opened only if one exists, for nothing but the API.
        const lab = openApi(':memory:', { clock: io.clock });
        opened = lab;
        const r = await lab.api.airRefractivity(input as never);
        print(r, () =>
          [
            `refractivity N      ${decimal(r.refractivityN, 2)}  (ITU-R P.453)`,
            `refractive index n  ${decimal(r.refractiveIndex, 8)}`,
            `water vapour e      ${decimal(r.waterVapourHpa, 2)} hPa`,
            `resonance shift     ${fmtPpm(r.shiftPpm)} against reference air (20 °C, 1013.25 hPa, 50 %RH; N = ${decimal(r.referenceN, 2)})`,
          ].join('\n'),
        );
        return 0;
      }
      case 'import': {
        const file = arg('FILE.csv');
        const text = readTextFile(file, io.cwd);
        const r = await open().api.importCsv(text);
        print(
          r,
          () => `imported ${r.checksImported} checks (${r.pointsImported} points) of ${r.metersSeen} meters`,
        );
        return 0;
      }
      case 'export': {
        const csv = await open().api.exportCsv();
        if (values.out) {
          writeFileSync(path.resolve(io.cwd, values.out), csv);
          print({ file: values.out }, () => `wrote ${values.out}`);
        } else io.out(csv.trimEnd());
        return 0;
      }
      case 'serve': {
        const port = numberOption('port', values.port, false) ?? 5317;
        const lab = open();
        const { startServer } = await import('../server/server');
        const staticDir = path.resolve(
          path.dirname(new URL(import.meta.url).pathname),
          '../../renderer/dist',
        );
        await ensureRendererBuilt(staticDir, io);
        const server = await startServer({ api: lab.api, port, staticDir });
        io.out(`Dipledger: ${server.launchUrl}  (Ctrl+C to stop)`);
        opened = undefined; // keep the lab open while serving
        await new Promise<void>((resolve) => process.once('SIGINT', () => resolve()));
        await server.close();
        lab.close();
        return 0;
      }
      default:
        throw new UsageError(`unknown command "${command}"`);
    }
  } catch (e) {
    return report(e, io, json);
  } finally {
    opened?.close();
  }
}

/** The window's files are made by `npm run build:renderer` (vite); `npm start` builds them, a
 * fresh install has none. Build them here on first use, or say exactly what to run. */
async function ensureRendererBuilt(staticDir: string, io: CliIo): Promise<void> {
  if (existsSync(path.join(staticDir, 'index.html'))) return;
  io.err('dipledger: the window is not built yet; building it once (npm run build:renderer)...');
  const root = path.resolve(staticDir, '../..');
  try {
    const { build } = await import('vite');
    await build({ configFile: path.join(root, 'vite.config.ts'), logLevel: 'warn' });
  } catch (e) {
    throw new UsageError(
      `the window could not be built (${e instanceof Error ? e.message.split('\n')[0] : String(e)}); ` +
        `run "npm run build:renderer" in ${root}, then "dipledger serve" again`,
    );
  }
  if (!existsSync(path.join(staticDir, 'index.html')))
    throw new UsageError(`the window was not built; run "npm run build:renderer" in ${root}`);
}

function report(e: unknown, io: CliIo, json: boolean): number {
  if (
    e instanceof UsageError ||
    (e instanceof TypeError && 'code' in e && String(e.code).startsWith('ERR_PARSE_ARGS'))
  ) {
    io.err(`dipledger: ${e.message}\nrun "dipledger --help" for usage`);
    return 2;
  }
  if (e instanceof LabError) {
    if (json) io.err(encodeJson({ error: { code: e.code, message: e.message, issues: e.issues } }, 2));
    else {
      // Fields named as the forms name them; --json keeps the machine path in each issue.
      io.err(`dipledger: ${messageForPeople(e.message, e.issues[0]?.field)}`);
      for (const i of e.issues.slice(1)) io.err(`  ${messageForPeople(i.message, i.field)}`);
      if (e.code === 'invalid-input') io.err('nothing was written.');
    }
    return e.code === 'internal' ? 3 : e.code === 'busy' ? 4 : 2;
  }
  if (e instanceof StoreError) {
    io.err(`dipledger: ${e.message}`);
    return 2;
  }
  io.err(`dipledger: internal error: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
  return 3;
}

export function processIo(): CliIo {
  const fixed = process.env.DIPLEDGER_TODAY;
  return {
    out: (t) => process.stdout.write(`${t}\n`),
    err: (t) => process.stderr.write(`${t}\n`),
    env: process.env,
    cwd: process.cwd(),
    // DIPLEDGER_TODAY pins the clock (reproducible examples and tests); otherwise the system clock.
    clock: fixed && /^\d{4}-\d{2}-\d{2}$/.test(fixed) ? fixedClock(`${fixed}T12:00:00.000Z`) : systemClock,
  };
}

const invokedDirectly =
  process.argv[1] && path.resolve(process.argv[1]) === path.resolve(new URL(import.meta.url).pathname);
if (invokedDirectly) {
  void runCli(process.argv.slice(2), processIo()).then((code) => {
    process.exitCode = code;
  });
}
