// Records commands: people who sign, signing and amending checks, a check's revisions, the
// audit trail, meter state changes with a reason, the integrity check and online backup.
// Thin: one LabApi call each (backup goes to the store, which owns the file).
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';
import type { CheckRevisionView, IntegrityReport } from '../api/contract-records';
import type { Meter } from '../api/contract';
import { backupLabFile } from '../../db/backup';
import type { CommandContext, CommandGroup } from './command';
import { UsageError, checkText, numberOption, readJsonFile, table } from './format';

/** Asks on the terminal without echo. Hand-written: node has no hidden prompt built in, and
 * a prompt library for one question is more than it is worth. */
function askHidden(question: string): Promise<string> {
  const stdin = process.stdin;
  return new Promise((resolve, reject) => {
    process.stderr.write(question);
    let typed = '';
    stdin.setRawMode(true);
    stdin.resume();
    stdin.setEncoding('utf8');
    const done = (err?: Error) => {
      stdin.setRawMode(false);
      stdin.pause();
      stdin.off('data', onData);
      process.stderr.write('\n');
      if (err) reject(err);
      else resolve(typed);
    };
    const onData = (chunk: string) => {
      for (const ch of chunk) {
        if (ch === '\r' || ch === '\n') return done();
        if (ch === '\u0003') return done(new UsageError('cancelled; nothing was signed'));
        if (ch === '\u007f' || ch === '\b') typed = typed.slice(0, -1);
        else typed += ch;
      }
    };
    stdin.on('data', onData);
  });
}

/** The passphrase: --passphrase-file, else DIPLEDGER_PASSPHRASE (automation only), else asked. */
async function passphrase(ctx: CommandContext, confirm: boolean): Promise<string> {
  const file = ctx.values['passphrase-file'];
  if (typeof file === 'string') {
    try {
      return readFileSync(path.resolve(ctx.io.cwd, file), 'utf8').replace(/\r?\n$/, '');
    } catch {
      throw LabError.field('--passphrase-file', file, 'a readable file', `cannot read ${file}`);
    }
  }
  const fromEnv = ctx.io.env.DIPLEDGER_PASSPHRASE;
  if (fromEnv !== undefined) return fromEnv;
  if (!process.stdin.isTTY)
    throw new UsageError(
      'no terminal to ask the passphrase on: give --passphrase-file FILE (or DIPLEDGER_PASSPHRASE, for automation only)',
    );
  const first = await askHidden('passphrase: ');
  if (confirm && (await askHidden('again: ')) !== first)
    throw new UsageError('the two passphrases differ; nothing was written');
  return first;
}

const checkIdArg = (text: string | undefined): number => {
  const n = Number(text);
  if (!text || !Number.isInteger(n) || n < 1)
    throw new UsageError(`expected a check number such as 12, got ${JSON.stringify(text ?? '')}`);
  return n;
};

function reasonOf(ctx: CommandContext): string {
  const r = ctx.values.reason;
  if (typeof r !== 'string' || !r.trim()) throw new UsageError('--reason TEXT is required: say why');
  return r;
}

export function revisionText(v: CheckRevisionView): string {
  const lines = [checkText(v.record), ''];
  lines.push(
    `revisions: ${v.revisions.map((r) => `${r.revision} ${r.state}`).join(', ')}; effective: ${v.effectiveRevision ?? 'none signed yet'}`,
  );
  if (v.amendment) lines.push(`amended by ${v.amendment.by} at ${v.amendment.at}: ${v.amendment.reason}`);
  for (const c of v.changes)
    lines.push(`  changed ${c.path}: ${JSON.stringify(c.before)} -> ${JSON.stringify(c.after)}`);
  lines.push('standards used:');
  for (const s of v.standardsUsed)
    lines.push(
      `  ${s.assetId}  certificate ${s.certificateId} (${s.issuedBy}), ${s.calibratedOn} to ${s.dueOn}${s.validOnCheckDate ? '' : '  NOT VALID ON THE CHECK DATE'}`,
    );
  for (const e of v.traceabilityExceptions) lines.push(`TRACEABILITY EXCEPTION: ${e}`);
  lines.push(
    v.signatures.length
      ? table(
          ['#', 'meaning', 'signed by', 'role', 'at', 'key'],
          v.signatures.map((s) => [
            String(s.seq),
            s.meaning,
            s.printedName,
            s.role,
            s.signedAt,
            s.keyFingerprint.slice(0, 16),
          ]),
        )
      : 'not signed',
  );
  if (v.awaiting) lines.push(`waiting for the "${v.awaiting}" signature`);
  return lines.join('\n');
}

export function integrityText(r: IntegrityReport): string {
  const lines = [
    `SQLite integrity check: ${r.sqlite.join('; ')}`,
    `audit trail: ${r.auditEntries} entries; newest hash ${r.auditHead}`,
    `signatures checked: ${r.signaturesChecked}`,
    `records compared with their newest audit entry: ${r.entitiesChecked ?? 0}; document anchors checked: ${r.anchorsChecked ?? 0}`,
  ];
  if (r.ok) lines.push('all records intact.');
  else {
    lines.push(`${r.problems.length} problem(s) found:`);
    for (const p of r.problems) lines.push(`- ${p.problem}`, `  affects: ${p.affects}`);
  }
  return lines.join('\n');
}

async function changeState(ctx: CommandContext, state: Meter['state']): Promise<number> {
  const m = await ctx.open().api.changeMeterState({ assetId: ctx.arg('REF'), state, reason: reasonOf(ctx) });
  ctx.print(m, () => `${m.assetId} is now ${m.state}`);
  return 0;
}

export const recordsCommands: CommandGroup = {
  usage: `  person add NAME --role ROLE        a person who signs (technician, reviewer, administrator); asks a passphrase
  person key NAME                    a new signing key (forgotten passphrase); old signatures stay verifiable
  person role NAME --role ROLE [--reason TEXT]   change a person's role (audited)
  person left NAME [--reason TEXT]   mark a person as left: keeps their signatures, signs no more
  signers                            people with signing keys
  sign CHECK --as PERSON [--meaning performed|reviewed|approved] [--passphrase-file F]
                                     sign the newest revision (asks the passphrase without echo;
                                     DIPLEDGER_PASSPHRASE is read for automation only)
  amend CHECK FILE.json --reason TEXT   a new revision of a check; the old one stays
  check CHECK [--revision N]         a check: revisions, what changed, standards, signatures
  audit [--meter REF] [--entity E] [--id ID] [--limit N]   the audit trail, newest first (a meter: its checks and documents too)
  quarantine|withdraw|reinstate REF --reason TEXT   change a meter's state (audited)
  integrity                          SQLite check, audit chain, every signature, every record against
                                     its newest audit entry, the schema (exit 1 if broken)
  anchor                             the audit head: keep it outside the lab file to detect a rewritten trail
  backup FILE                        a consistent copy while the lab is in use
`,
  options: {
    as: { type: 'string' },
    role: { type: 'string' },
    meaning: { type: 'string' },
    'passphrase-file': { type: 'string' },
    reason: { type: 'string' },
    revision: { type: 'string' },
    entity: { type: 'string' },
    id: { type: 'string' },
    meter: { type: 'string' },
    limit: { type: 'string' },
  },
  commands: {
    async person(ctx) {
      const sub = ctx.rest[0];
      const name = ctx.rest[1];
      if (sub === 'key') {
        // A forgotten passphrase: a new key; signatures made with the old one still verify.
        if (!name) throw new UsageError('person key needs NAME');
        const lab = ctx.open();
        const pass = await passphrase(ctx, true);
        const s = await lab.api.rekeySigner({ name, passphrase: pass });
        ctx.print(
          s,
          () => `${s.person.name} has a new signing key ${s.keyFingerprint}; older signatures still verify`,
        );
        return 0;
      }
      if (sub === 'role' || sub === 'left') {
        if (!name) throw new UsageError(`person ${sub} needs NAME`);
        const reason = typeof ctx.values.reason === 'string' ? ctx.values.reason : undefined;
        const api = ctx.open().api;
        const p =
          sub === 'role'
            ? await api.changeRole({ name, role: ctx.values.role as never, reason })
            : await api.markPersonLeft({ name, reason });
        ctx.print(p, () =>
          p.leftOn ? `${p.name} left on ${p.leftOn}; their signatures stand` : `${p.name} is now a ${p.role}`,
        );
        return 0;
      }
      if (sub !== 'add') throw new UsageError('usage: person add|key|role|left NAME');
      if (!name) throw new UsageError('person add needs NAME');
      const role = ctx.values.role;
      const lab = ctx.open();
      const pass = await passphrase(ctx, true);
      const s = await lab.api.enrolSigner({ name, role: role as never, passphrase: pass });
      ctx.print(s, () => `${s.person.name} (${s.person.role}) can sign; key ${s.keyFingerprint}`);
      return 0;
    },
    async signers(ctx) {
      const rows = await ctx.open().api.listSigners();
      ctx.print(rows, () =>
        table(
          ['name', 'role', 'since', 'key'],
          rows.map((r) => [r.person.name, r.person.role, r.enrolledAt, r.keyFingerprint]),
        ),
      );
      return 0;
    },
    async sign(ctx) {
      const checkId = checkIdArg(ctx.rest[0]);
      const as = ctx.values.as;
      if (typeof as !== 'string' || !as) throw new UsageError('sign needs --as PERSON');
      const lab = ctx.open();
      const pass = await passphrase(ctx, false);
      const meaning = typeof ctx.values.meaning === 'string' ? ctx.values.meaning : undefined;
      const v = await lab.api.signCheck({ checkId, person: as, passphrase: pass, meaning: meaning as never });
      const s = v.signatures[v.signatures.length - 1];
      ctx.print(
        v,
        () =>
          `check ${checkId} revision ${v.record.revision}: ${s?.meaning} by ${s?.printedName} at ${s?.signedAt}; the revision is locked`,
      );
      return 0;
    },
    async amend(ctx) {
      const checkId = checkIdArg(ctx.rest[0]);
      const file = ctx.rest[1];
      if (!file) throw new UsageError('amend needs CHECK FILE.json');
      const reason = reasonOf(ctx);
      const document = readJsonFile(file, ctx.io.cwd);
      const v = await ctx.open().api.amendCheck({ checkId, reason, document });
      ctx.print(v, () => revisionText(v));
      return 0;
    },
    async check(ctx) {
      const checkId = checkIdArg(ctx.rest[0]);
      const revision = numberOption('revision', ctx.values.revision as string | undefined, false);
      const v = await ctx
        .open()
        .api.getCheckRevision({ checkId, ...(revision === undefined ? {} : { revision }) });
      ctx.print(v, () => revisionText(v));
      return 0;
    },
    async audit(ctx) {
      const limit = numberOption('limit', ctx.values.limit as string | undefined, false);
      const rows = await ctx.open().api.listAudit({
        entity: ctx.values.entity as string | undefined,
        entityId: ctx.values.id as string | undefined,
        meter: ctx.values.meter as string | undefined,
        ...(limit === undefined ? {} : { limit }),
      });
      ctx.print(rows, () =>
        table(
          ['#', 'at', 'who', 'action', 'what', 'after'],
          rows.map((e) => [
            String(e.id),
            e.at,
            e.actor,
            e.action,
            `${e.entity} ${e.entityId}`,
            JSON.stringify(e.after).slice(0, 60),
          ]),
          [0],
        ),
      );
      return 0;
    },
    quarantine: (ctx) => changeState(ctx, 'quarantined'),
    withdraw: (ctx) => changeState(ctx, 'withdrawn'),
    reinstate: (ctx) => changeState(ctx, 'in-service'),
    async anchor(ctx) {
      const [newest] = await ctx.open().api.listAudit({ limit: 1 });
      const head = newest?.hash ?? '0'.repeat(64);
      ctx.print({ auditHead: head, entryId: newest?.id ?? null, at: newest?.at ?? null }, () =>
        [
          `audit head ${head}`,
          newest ? `(audit entry ${newest.id}, ${newest.at})` : '(the trail is empty)',
          'Keep it outside the lab file (a logbook, an e-mail to yourself): if it is ever missing from the',
          'trail, entries were removed or the trail rewritten. Every issued document carries the head too.',
        ].join('\n'),
      );
      return 0;
    },
    async integrity(ctx) {
      let report: IntegrityReport;
      try {
        report = await ctx.open().api.verifyIntegrity();
      } catch (e) {
        // A file too damaged to open is the integrity check's answer, not an internal fault.
        const code = (e as { code?: unknown }).code;
        if (typeof code === 'string' && /^SQLITE_(CORRUPT|NOTADB)/.test(code)) {
          ctx.print(
            { ok: false, error: (e as Error).message },
            () => `the lab file is damaged: ${(e as Error).message}`,
          );
          return 1;
        }
        throw e;
      }
      ctx.print(report, () => integrityText(report));
      return report.ok ? 0 : 1;
    },
    async backup(ctx) {
      const target = path.resolve(ctx.io.cwd, ctx.arg('FILE'));
      if (existsSync(target))
        throw LabError.field(
          'FILE',
          ctx.rest[0],
          'a file name not yet used',
          `${ctx.rest[0]} exists already: choose a new name`,
        );
      if (target === path.resolve(ctx.dbFile))
        throw new UsageError('the backup must not be the lab file itself');
      const r = await backupLabFile(ctx.dbFile, target);
      const ok = r.check.length === 1 && r.check[0] === 'ok';
      ctx.print({ file: target, pages: r.pages, check: r.check }, () =>
        ok
          ? `backed up to ${target} (${r.pages} pages); the copy passes SQLite's integrity check`
          : `backup written to ${target} but its check failed: ${r.check.join('; ')}`,
      );
      return ok ? 0 : 1;
    },
  },
};
