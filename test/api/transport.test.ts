// The contract-derived client against dispatch: values and LabErrors survive the envelope,
// and names that are not operations never reach the api object.
import { describe, expect, it } from 'vitest';
import { OPERATIONS } from '../../app/api/contract';
import type { AirResult, LabApi, OperationName, Person } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { httpClient, makeClient } from '../../app/api/client';
import { decodeWire, dispatch, encodeWire, isOperationName } from '../../app/api/transport';
import { refusingApi } from '../e2e/fixtures/fakeLab';

/** A tiny in-memory lab: people can be added and listed; everything else is refused. */
function memoryLab(): LabApi {
  const people: Person[] = [];
  return {
    ...refusingApi('is not in this in-memory lab'),
    listMeters: () => Promise.resolve([]),
    getMeter: (assetId) => Promise.reject(new LabError('not-found', `no meter ${assetId}`)),
    listPeople: () => Promise.resolve([...people]),
    createPerson: (input) => {
      if (!input.name.trim())
        return Promise.reject(
          LabError.field('name', input.name, 'a name', 'name: expected a name, not empty'),
        );
      const person: Person = { id: people.length + 1, name: input.name, role: input.role };
      people.push(person);
      return Promise.resolve(person);
    },
    airRefractivity: (input) => {
      // Infinity stands in for the infinite degrees of freedom budgets carry.
      const r: AirResult = {
        refractivityN: input.temperatureC === 20 ? 320 : Infinity,
        refractiveIndex: 1.00032,
        waterVapourHpa: 11.7,
        shiftPpm: -Infinity,
        referenceN: NaN,
      };
      return Promise.resolve(r);
    },
    exportCsv: () => Promise.reject(new Error('disk on fire')),
  };
}

/** The client wired straight to dispatch, the way IPC does it (structured clone aside). */
function directClient(api: LabApi): LabApi {
  return makeClient(async (op, args) => {
    const env = await dispatch(api, op, args);
    if (env.ok) return env.value;
    throw new LabError(env.error.code, env.error.message, env.error.issues);
  });
}

describe('makeClient', () => {
  it('has one function per operation of the contract and nothing else', () => {
    const client = makeClient(() => Promise.resolve(undefined));
    expect(Object.keys(client).sort()).toEqual(Object.keys(OPERATIONS).sort());
    for (const op of Object.keys(OPERATIONS) as OperationName[]) expect(typeof client[op]).toBe('function');
  });

  it('passes the operation name and positional arguments to call', async () => {
    const seen: [string, unknown[]][] = [];
    const client = makeClient((op, args) => {
      seen.push([op, args]);
      return Promise.resolve('x');
    });
    await client.getMeter('WM-9');
    await client.listDue({ withinDays: 30 });
    expect(seen).toEqual([
      ['getMeter', ['WM-9']],
      ['listDue', [{ withinDays: 30 }]],
    ]);
  });
});

describe('client ⇄ dispatch', () => {
  it('round-trips values and state', async () => {
    const client = directClient(memoryLab());
    const made = await client.createPerson({ name: 'Ada Example', role: 'technician' });
    expect(made).toEqual({ id: 1, name: 'Ada Example', role: 'technician' });
    expect(await client.listPeople()).toEqual([made]);
  });

  it('rethrows a LabError with its code and field issues', async () => {
    const client = directClient(memoryLab());
    const err = await client.createPerson({ name: '  ', role: 'reviewer' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(LabError);
    expect((err as LabError).code).toBe('invalid-input');
    expect((err as LabError).issues).toEqual([
      { field: 'name', value: '  ', expected: 'a name', message: 'name: expected a name, not empty' },
    ]);
    await expect(client.getMeter('nope')).rejects.toMatchObject({
      code: 'not-found',
      message: 'no meter nope',
    });
  });

  it('reports a plain thrown Error as internal', async () => {
    await expect(directClient(memoryLab()).exportCsv()).rejects.toMatchObject({
      code: 'internal',
      message: 'disk on fire',
    });
  });
});

describe('dispatch', () => {
  it('returns the ok envelope', async () => {
    expect(await dispatch(memoryLab(), 'listMeters', [])).toEqual({ ok: true, value: [] });
  });

  it('refuses unknown operations, including inherited names, without touching the api', async () => {
    const api = memoryLab();
    for (const op of [
      'dropEverything',
      'constructor',
      '__proto__',
      'toString',
      'hasOwnProperty',
      '',
      42,
      null,
    ]) {
      const env = await dispatch(api, op, []);
      expect(env.ok).toBe(false);
      if (!env.ok) {
        expect(env.error.code).toBe('invalid-input');
        expect(env.error.issues[0]?.field).toBe('operation');
      }
    }
    expect(isOperationName('getLab')).toBe(true);
    expect(isOperationName('__proto__')).toBe(false);
  });

  it('refuses arguments that are not an array', async () => {
    for (const args of [undefined, null, 'WM-1', { 0: 'WM-1' }]) {
      const env = await dispatch(memoryLab(), 'getMeter', args);
      expect(env).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
    }
  });

  it('never throws, even when the api method is missing or throws synchronously', async () => {
    const broken = {
      ...memoryLab(),
      listPeople: undefined,
      getLab: () => {
        throw new Error('sync boom');
      },
    } as unknown as LabApi;
    expect(await dispatch(broken, 'listPeople', [])).toMatchObject({
      ok: false,
      error: { code: 'internal' },
    });
    expect(await dispatch(broken, 'getLab', [])).toMatchObject({
      ok: false,
      error: { code: 'internal', message: 'sync boom' },
    });
  });
});

describe('wire JSON', () => {
  it('keeps Infinity, -Infinity and NaN in number fields, and leaves look-alike text alone', () => {
    const value = {
      a: Infinity,
      b: [-Infinity, NaN, 1.5],
      remarks: 'Infinity',
      standards: ['NaN'],
    };
    const back = decodeWire(encodeWire(value)) as typeof value;
    expect(back.a).toBe(Infinity);
    expect(back.b[0]).toBe(-Infinity);
    expect(back.b[1]).toBeNaN();
    expect(back.remarks).toBe('Infinity');
    expect(back.standards).toEqual(['NaN']);
  });
});

describe('httpClient', () => {
  /** A fetch that answers in-process from dispatch, to test the HTTP framing alone. */
  const fetchInto =
    (api: LabApi, seen: string[] = []) =>
    async (url: string, init: { body: string; headers: Record<string, string> }) => {
      seen.push(url);
      expect(init.headers['content-type']).toBe('application/json');
      const op = url.slice(url.lastIndexOf('/') + 1);
      const { args } = decodeWire(init.body) as { args: unknown };
      const env = await dispatch(api, op, args);
      return { status: env.ok ? 200 : 400, text: () => Promise.resolve(encodeWire(env)) };
    };

  it('POSTs to /api/<op> and decodes values, non-finite numbers included', async () => {
    const seen: string[] = [];
    const client = httpClient('http://127.0.0.1:9/', fetchInto(memoryLab(), seen));
    const air = await client.airRefractivity({ temperatureC: 25, humidityPct: 50, pressureHpa: 1013 });
    expect(air.refractivityN).toBe(Infinity);
    expect(air.shiftPpm).toBe(-Infinity);
    expect(air.referenceN).toBeNaN();
    expect(seen).toEqual(['http://127.0.0.1:9/api/airRefractivity']);
  });

  it('uses the same origin when the base is empty', async () => {
    const seen: string[] = [];
    await httpClient('', fetchInto(memoryLab(), seen)).listMeters();
    expect(seen).toEqual(['/api/listMeters']);
  });

  it('turns error envelopes, unreadable answers and network failures into LabError', async () => {
    await expect(httpClient('', fetchInto(memoryLab())).getMeter('X')).rejects.toMatchObject({
      code: 'not-found',
    });
    const html = () =>
      Promise.resolve({ status: 502, text: () => Promise.resolve('<html>bad gateway</html>') });
    await expect(httpClient('', html).listMeters()).rejects.toMatchObject({
      code: 'internal',
      message: expect.stringContaining('HTTP 502') as unknown,
    });
    const down = () => Promise.reject(new TypeError('fetch failed'));
    const err = await httpClient('', down)
      .listMeters()
      .catch((e: unknown) => e);
    expect(err).toBeInstanceOf(LabError);
    expect((err as LabError).message).toContain('cannot reach the lab service');
  });
});
