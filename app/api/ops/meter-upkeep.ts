// A meter's specification edited as a new audited revision, and the register brought in from,
// and written out as, its CSV. Results already stored carry the inputs they were computed with,
// so an edit never changes them; checks recorded from the edit on are judged by the new values,
// and the due date follows the new interval.
import { z } from 'zod';
import { appendAudit } from '../../../db/queries/audit';
import { insertMeter, listMeterRecords } from '../../../db/queries/meters';
import { insertMeterRevision, updateMeterSpec } from '../../../db/queries/upkeep';
import { columnOfField, readRegisterCsv, writeRegisterCsv } from '../../formats/register-csv';
import type { Meter } from '../contract';
import type { RegisterImportResult } from '../contract-upkeep';
import { LabError, describe, type FieldIssue } from '../errors';
import { Issues, parseWith } from '../issues';
import { MeterSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { getMeter } from './meters';
import { requireMeter } from './lookups';
import { fieldsOfMeter, meterFromFields } from './meter-spec';

const EDITABLE = Object.keys(MeterSchema.shape).filter((k) => k !== 'assetId' && k !== 'state');

const EditSchema = z.strictObject({
  assetId: z.string('expected the asset id of a meter').trim().min(1, 'expected the asset id of a meter'),
  reason: z
    .string('expected the reason for the change')
    .trim()
    .min(3, 'expected a reason of a few words')
    .max(1000, 'expected a reason of at most 1000 characters'),
  changes: z.partialRecord(
    z.enum(EDITABLE as [string, ...string[]], `expected fields of a meter document: ${EDITABLE.join(', ')}`),
    z.unknown(),
  ),
});

export function editMeter(ctx: ServiceContext, input: unknown) {
  const e = parseWith(EditSchema, input);
  const rec = requireMeter(ctx, e.assetId);
  const given = Object.keys(e.changes);
  if (given.length === 0)
    throw LabError.field('changes', e.changes, 'at least one field of the specification to change');
  const fields = { ...fieldsOfMeter(rec.meter), ...e.changes };
  const m = parseWith(MeterSchema, fields);
  const issues = new Issues();
  const after = meterFromFields(ctx, m, issues, { newAssetId: false });
  issues.throwIfAny();
  if (!after) throw new LabError('internal', 'specification refused without a reason');
  const next: Meter = { ...after, state: rec.meter.state };
  if (JSON.stringify(next) === JSON.stringify(rec.meter))
    throw LabError.field(
      'changes',
      e.changes,
      'a value that differs from the present specification',
      `changes: ${given.join(', ')} already hold these values; nothing to change`,
    );
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    const effectiveFrom = ctx.clock.today();
    updateMeterSpec(ctx.db, rec.id, next);
    const revision = insertMeterRevision(ctx.db, rec.id, {
      effectiveFrom,
      reason: e.reason,
      actor: ctx.actor,
      recordedAt: at,
      before: rec.meter,
      after: next,
    });
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'edit-specification',
      entity: 'meter',
      entityId: rec.meter.assetId,
      before: rec.meter,
      after: { ...next, revision, effectiveFrom, reason: e.reason },
    });
  })();
  return getMeter(ctx, rec.meter.assetId);
}

const ImportSchema = z.strictObject({
  csv: z.string('expected the text of a register CSV'),
  dryRun: z.boolean('expected true or false').default(false),
});

/** A refusal of a document field, named by the line and column of the CSV it came from. */
function atLine(line: number, i: FieldIssue): FieldIssue {
  const field = i.field.replace(/^line \d+, /, '');
  const column = columnOfField(field) ?? field;
  return {
    ...i,
    field: `line ${line}, column ${column}`,
    message: `line ${line}, column ${column}: ${describe(i.value)}: expected ${i.expected}`,
  };
}

export function importRegister(ctx: ServiceContext, input: unknown): RegisterImportResult {
  const { csv, dryRun } = parseWith(ImportSchema, input);
  const read = readRegisterCsv(csv);
  const problems: FieldIssue[] = read.issues.map((i) => ({
    field: `line ${i.line}, column ${i.column}`,
    value: i.value,
    expected: i.expected,
    message: i.message,
  }));
  const meters: { line: number; meter: Meter }[] = [];
  const seen = new Map<string, number>();
  for (const row of read.rows) {
    let fields;
    try {
      fields = parseWith(MeterSchema, row.document);
    } catch (e) {
      if (!(e instanceof LabError)) throw e;
      problems.push(...e.issues.map((i) => atLine(row.line, i)));
      continue;
    }
    const issues = new Issues();
    const meter = meterFromFields(ctx, fields, issues, { newAssetId: true });
    problems.push(...issues.list.map((i) => atLine(row.line, i)));
    const earlier = seen.get(fields.assetId);
    if (earlier !== undefined)
      problems.push({
        field: `line ${row.line}, column asset_id`,
        value: fields.assetId,
        expected: 'an asset id not already in the file',
        message: `line ${row.line}, column asset_id: ${describe(fields.assetId)}: expected an asset id not already in the file (line ${earlier} has it)`,
      });
    seen.set(fields.assetId, row.line);
    if (meter) meters.push({ line: row.line, meter });
  }
  if (problems.length > 0) throw LabError.invalid(problems);
  if (!dryRun)
    ctx.db.transaction(() => {
      const at = ctx.clock.now();
      for (const { meter } of meters) {
        insertMeter(ctx.db, meter, at);
        appendAudit(ctx.db, {
          at,
          actor: ctx.actor,
          action: 'create',
          entity: 'meter',
          entityId: meter.assetId,
          before: undefined,
          after: meter,
        });
      }
    })();
  return {
    dryRun,
    meters: meters.map(({ line, meter }) => ({
      line,
      assetId: meter.assetId,
      description: meter.description,
    })),
  };
}

export function exportRegister(ctx: ServiceContext): string {
  return writeRegisterCsv(listMeterRecords(ctx.db).map((r) => r.meter));
}

export const meterUpkeepOps = { editMeter, importRegister, exportRegister } satisfies OpGroup<
  'editMeter' | 'importRegister' | 'exportRegister'
>;
