// The lab's settings and its people.
import { getLab as readLab, putLab } from '../../../db/queries/lab';
import { appendAudit } from '../../../db/queries/audit';
import { findPersonByName, insertPerson, listPeople as readPeople } from '../../../db/queries/people';
import type { Person } from '../contract';
import { LabError } from '../errors';
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

export const labOps = { getLab, updateLab, listPeople, createPerson } satisfies OpGroup<
  'getLab' | 'updateLab' | 'listPeople' | 'createPerson'
>;
