// The lab's settings and its people.
import { getLab as readLab, putLab } from '../../../db/queries/lab';
import { appendAudit } from '../../../db/queries/audit';
import { findPersonByName, insertPerson, listPeople as readPeople } from '../../../db/queries/people';
import type { Person } from '../contract';
import { z } from 'zod';
import { setPersonLeft, setPersonRole } from '../../../db/queries/upkeep';
import { LabError, describe } from '../errors';
import { parseWith } from '../issues';
import { LabSettingsSchema, PersonSchema } from '../schemas';
import type { OpGroup, ServiceContext } from './context';
import { requireLab } from './lookups';

export function getLab(ctx: ServiceContext) {
  return requireLab(ctx);
}

export function updateLab(ctx: ServiceContext, input: unknown) {
  const settings = parseWith(LabSettingsSchema, input);
  if (settings.intervalMinMonths > settings.intervalMaxMonths) {
    throw LabError.field(
      'intervalMinMonths',
      settings.intervalMinMonths,
      `at most intervalMaxMonths (${settings.intervalMaxMonths})`,
    );
  }
  const before = readLab(ctx.db);
  ctx.db.transaction(() => {
    putLab(ctx.db, settings);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: before ? 'update' : 'create',
      entity: 'lab',
      entityId: '1',
      before,
      after: settings,
    });
  })();
  return requireLab(ctx);
}

export function listPeople(ctx: ServiceContext) {
  return readPeople(ctx.db);
}

export function createPerson(ctx: ServiceContext, input: unknown) {
  const p = parseWith(PersonSchema, input);
  if (findPersonByName(ctx.db, p.name))
    throw LabError.field(
      'name',
      p.name,
      'a name not already in the lab',
      `name: ${p.name} is already one of the lab's people`,
    );
  let person: Person | undefined;
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    person = insertPerson(ctx.db, p, at);
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'create',
      entity: 'person',
      entityId: String(person.id),
      before: undefined,
      after: p,
    });
  })();
  return person as Person;
}

const RoleSchema = z.strictObject({
  name: z.string('expected a name').trim().min(1, 'expected a name'),
  role: PersonSchema.shape.role,
  reason: z.string('expected the reason as text').max(1000).optional(),
});
const LeftSchema = z.strictObject({
  name: z.string('expected a name').trim().min(1, 'expected a name'),
  reason: z.string('expected the reason as text').max(1000).optional(),
});

/** One of the lab's people, or a not-found refusal naming the field. */
export function requirePerson(ctx: ServiceContext, name: string): Person {
  const p = findPersonByName(ctx.db, name);
  if (!p)
    throw new LabError('not-found', `name: ${describe(name)} is not one of the lab's people`, [
      {
        field: 'name',
        value: name,
        expected: "one of the lab's people",
        message: `name: ${describe(name)} is not one of the lab's people`,
      },
    ]);
  return p;
}

export function changeRole(ctx: ServiceContext, input: unknown) {
  const r = parseWith(RoleSchema, input);
  const p = requirePerson(ctx, r.name);
  if (p.leftOn)
    throw LabError.field('name', r.name, 'someone still in the lab', `name: ${p.name} left on ${p.leftOn}`);
  if (p.role === r.role)
    throw LabError.field('role', r.role, `a role other than the present one (${p.role})`);
  ctx.db.transaction(() => {
    setPersonRole(ctx.db, p.id, r.role);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: 'change-role',
      entity: 'person',
      entityId: String(p.id),
      before: { role: p.role },
      after: { role: r.role, reason: r.reason ?? '' },
    });
  })();
  return requirePerson(ctx, p.name);
}

export function markPersonLeft(ctx: ServiceContext, input: unknown) {
  const r = parseWith(LeftSchema, input);
  const p = requirePerson(ctx, r.name);
  if (p.leftOn)
    throw LabError.field(
      'name',
      r.name,
      'someone still in the lab',
      `name: ${p.name} already left on ${p.leftOn}`,
    );
  const on = ctx.clock.today();
  ctx.db.transaction(() => {
    setPersonLeft(ctx.db, p.id, on);
    appendAudit(ctx.db, {
      at: ctx.clock.now(),
      actor: ctx.actor,
      action: 'left',
      entity: 'person',
      entityId: String(p.id),
      before: undefined,
      after: { leftOn: on, reason: r.reason ?? '' },
    });
  })();
  return requirePerson(ctx, p.name);
}

export const labOps = {
  getLab,
  updateLab,
  listPeople,
  createPerson,
  changeRole,
  markPersonLeft,
} satisfies OpGroup<'getLab' | 'updateLab' | 'listPeople' | 'createPerson' | 'changeRole' | 'markPersonLeft'>;
