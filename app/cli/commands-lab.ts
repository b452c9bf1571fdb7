// Setting up and keeping a lab: meters (add, edit the specification, import and export the
// register CSV), lab standards (add, record a new certificate, retire, list) and the lab's own
// settings. Thin: one LabApi call each; documents are read here, judged by the service.
import { readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';
import type { MeterDetail, Standard } from '../api/contract';
import type { CommandContext, CommandGroup } from './command';
import { UsageError, band, readJsonFile, table } from './format';

function reasonOf(ctx: CommandContext): string {
  const r = ctx.values.reason;
  if (typeof r !== 'string' || !r.trim()) throw new UsageError('--reason TEXT is required: say why');
  return r;
}

function readText(ctx: CommandContext, file: string): string {
  try {
    return readFileSync(path.resolve(ctx.io.cwd, file), 'utf8');
  } catch {
    throw LabError.field('FILE', file, 'a readable file', `cannot read ${file}`);
  }
}

/** An object document (not an array, not a number). */
function readObject(ctx: CommandContext, file: string): Record<string, unknown> {
  const doc = readJsonFile(file, ctx.io.cwd);
  if (doc === null || typeof doc !== 'object' || Array.isArray(doc))
    throw LabError.field('FILE', file, 'a JSON object', `${file}: expected a JSON object`);
  return doc as Record<string, unknown>;
}

function nth(ctx: CommandContext, i: number, name: string, usage: string): string {
  const v = ctx.rest[i];
  if (!v) throw new UsageError(`needs ${name}; usage: ${usage}`);
  return v;
}

export function meterRevisionsText(d: MeterDetail): string {
  const revs = d.revisions ?? [];
  if (revs.length === 0) return 'specification: revision 1 (as added)';
  return [
    `specification: revision ${revs[revs.length - 1]?.revision ?? 1}, in effect from ${revs[revs.length - 1]?.effectiveFrom ?? ''}`,
    ...revs.map((r) => {
      const changed = Object.keys(r.after).filter(
        (k) =>
          JSON.stringify((r.after as unknown as Record<string, unknown>)[k]) !==
          JSON.stringify((r.before as unknown as Record<string, unknown>)[k]),
      );
      return `  rev ${r.revision} from ${r.effectiveFrom} by ${r.actor}: ${changed.join(', ')} (${r.reason})`;
    }),
  ].join('\n');
}

function standardsTable(rows: Standard[]): string {
  return table(
    ['asset', 'kind', 'range', 'certificate', 'issued by', 'due', 'U (ppm, k)', 'state'],
    rows.map((s) => {
      const c = s.certificates[0];
      return [
        s.assetId,
        s.kind ?? 'source',
        s.minHz && s.maxHz ? band({ minHz: s.minHz, maxHz: s.maxHz }) : '-',
        c?.certificateId ?? '-',
        c?.issuedBy ?? '-',
        s.dueOn || '-',
        c ? `${c.expandedUncertaintyPpm} (k=${c.coverageFactor})` : '-',
        s.retiredOn ? `retired ${s.retiredOn}` : s.daysToDue < 0 ? 'OVERDUE' : 'in use',
      ];
    }),
  );
}

const HELP = {
  meter: `usage:
  dipledger meter add FILE.json                  add a meter (docs/examples/meter.json)
  dipledger meter edit REF FILE.json --reason TEXT
                                                 a new revision of its specification: only the
                                                 fields in FILE.json change; the old values are kept,
                                                 stored results never change
  dipledger meter import FILE.csv [--dry-run]    the register CSV (docs/examples/register.csv),
                                                 all rows or none; refusals name line and column
  dipledger meter export [--out FILE.csv]        the register in the same columns
Exit 2 on bad input; nothing is written.`,
  standard: `usage:
  dipledger standard add FILE.json               a lab standard (docs/examples/standard.json)
  dipledger standard certificate REF FILE.json   record its new certificate
                                                 (docs/examples/standard-certificate.json)
  dipledger standard retire REF --reason TEXT    no check after today may name it
Exit 2 on bad input; nothing is written.`,
  standards: `usage: dipledger standards       the lab standards, newest certificate, due date`,
  lab: `usage:
  dipledger lab show                             identity, decision rule, interval policy, defaults
  dipledger lab set FILE.json                    change the fields given (docs/examples/lab.json);
                                                 audited
Exit 2 on bad input; nothing is written.`,
  person: `usage:
  dipledger person add NAME --role ROLE          a person who signs; asks a passphrase
  dipledger person key NAME                      a new signing key (a forgotten passphrase);
                                                 signatures made with the old key stay verifiable
  dipledger person role NAME --role ROLE [--reason TEXT]
  dipledger person left NAME [--reason TEXT]     keeps their signatures; cannot sign again
Passphrase: --passphrase-file FILE, else asked without echo.`,
};

export const labCommands: CommandGroup = {
  usage: `  meter add|edit|import|export ...    add a meter, edit its specification (--reason), register CSV
  standard add|certificate|retire ... a lab standard, its new certificate, its retirement
  standards                          the lab standards and their certificates
  lab show | lab set FILE.json       the lab's identity and policies (audited)
`,
  options: {
    'dry-run': { type: 'boolean', default: false },
  },
  help: HELP,
  commands: {
    async meter(ctx) {
      const sub = ctx.rest[0];
      if (sub === 'add') {
        const doc = readObject(ctx, nth(ctx, 1, 'FILE.json', 'meter add FILE.json'));
        const m = await ctx.open().api.createMeter(doc as never);
        ctx.print(m, () => `added ${m.assetId} (${band(m)}), interval ${m.intervalMonths} months`);
        return 0;
      }
      if (sub === 'edit') {
        const ref = nth(ctx, 1, 'REF', 'meter edit REF FILE.json --reason TEXT');
        const changes = readObject(ctx, nth(ctx, 2, 'FILE.json', 'meter edit REF FILE.json --reason TEXT'));
        const reason = reasonOf(ctx);
        const d = await ctx.open().api.editMeter({ assetId: ref, reason, changes });
        ctx.print(d, () => `${d.meter.assetId}: ${meterRevisionsText(d)}`);
        return 0;
      }
      if (sub === 'import') {
        const file = nth(ctx, 1, 'FILE.csv', 'meter import FILE.csv [--dry-run]');
        const csv = readText(ctx, file);
        const r = await ctx.open().api.importRegister({ csv, dryRun: ctx.values['dry-run'] === true });
        ctx.print(r, () =>
          [
            `${r.dryRun ? 'would add' : 'added'} ${r.meters.length} meter${r.meters.length === 1 ? '' : 's'}${r.dryRun ? ' (dry run: nothing written)' : ''}`,
            ...r.meters.map((m) => `  line ${m.line}: ${m.assetId}  ${m.description}`),
          ].join('\n'),
        );
        return 0;
      }
      if (sub === 'export') {
        const csv = await ctx.open().api.exportRegister();
        const out = ctx.values.out;
        if (typeof out === 'string') {
          writeFileSync(path.resolve(ctx.io.cwd, out), csv);
          ctx.print({ file: out }, () => `wrote ${out}`);
        } else ctx.io.out(csv.trimEnd());
        return 0;
      }
      throw new UsageError('usage: meter add|edit|import|export ... (dipledger meter --help)');
    },
    async standard(ctx) {
      const sub = ctx.rest[0];
      const api = () => ctx.open().api;
      if (sub === 'add') {
        const doc = readObject(ctx, nth(ctx, 1, 'FILE.json', 'standard add FILE.json'));
        const s = await api().createStandard(doc as never);
        ctx.print(s, () => `added ${s.assetId}; due ${s.dueOn}`);
        return 0;
      }
      if (sub === 'certificate') {
        const ref = nth(ctx, 1, 'REF', 'standard certificate REF FILE.json');
        const doc = readObject(ctx, nth(ctx, 2, 'FILE.json', 'standard certificate REF FILE.json'));
        const s = await api().addStandardCertificate({ assetId: ref, certificate: doc as never });
        ctx.print(
          s,
          () =>
            `${s.assetId}: certificate ${s.certificates[0]?.certificateId ?? ''} recorded; due ${s.dueOn}`,
        );
        return 0;
      }
      if (sub === 'retire') {
        const ref = nth(ctx, 1, 'REF', 'standard retire REF --reason TEXT');
        const s = await api().retireStandard({ assetId: ref, reason: reasonOf(ctx) });
        ctx.print(s, () => `${s.assetId} retired on ${s.retiredOn ?? ''}`);
        return 0;
      }
      throw new UsageError('usage: standard add|certificate|retire ... (dipledger standard --help)');
    },
    async standards(ctx) {
      const rows = await ctx.open().api.listStandards();
      ctx.print(rows, () =>
        rows.length ? standardsTable(rows) : 'no lab standards yet ("dipledger standard add")',
      );
      return 0;
    },
    async lab(ctx) {
      const sub = ctx.rest[0];
      if (sub === 'show') {
        const l = await ctx.open().api.getLab();
        ctx.print(l, () =>
          [
            `${l.name}`,
            `address        ${l.address || '-'}`,
            `accreditation  ${l.accreditation || '-'}`,
            `decision rule  ${l.decisionRule.kind}${l.decisionRule.kind === 'guarded' ? ` (w = ${l.decisionRule.multipleOfU} U)` : l.decisionRule.kind === 'guarded-fixed' ? ` (${l.decisionRule.guardBandPpm} ppm)` : ''}`,
            `intervals      ${l.intervalMinMonths} to ${l.intervalMaxMonths} months; reliability target ${l.reliabilityTarget}`,
            `bench defaults u(T) ${l.defaultTemperatureUncertaintyC} degC, u(p) ${l.defaultPressureUncertaintyHpa} hPa, u(RH) ${l.defaultHumidityUncertaintyPct} %`,
            `signing        ${l.signersMustDiffer ? 'reviewer differs from performer' : 'one person may sign both'}; traceability ${l.traceabilityPolicy}`,
          ].join('\n'),
        );
        return 0;
      }
      if (sub === 'set') {
        const doc = readObject(ctx, nth(ctx, 1, 'FILE.json', 'lab set FILE.json'));
        const lab = ctx.open();
        const before = await lab.api.getLab();
        const after = await lab.api.updateLab({ ...before, ...doc });
        ctx.print(after, () => `lab settings saved: ${after.name}`);
        return 0;
      }
      throw new UsageError('usage: lab show | lab set FILE.json (dipledger lab --help)');
    },
  },
};
