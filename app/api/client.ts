// Clients of the LabApi derived from the contract: one generic builder, and the HTTP and IPC
// transports the renderer and tests use. No operation is listed by hand here.
import { OPERATIONS } from './contract';
import type { LabApi, OperationName } from './contract';
import { LabError } from './errors';
import { decodeWire, encodeWire, unwrap } from './transport';
import type { CallFn } from './transport';

/** Each client method has exactly the parameters and result of the contract's method. */
type ClientMethod<K extends OperationName> = (...args: Parameters<LabApi[K]>) => ReturnType<LabApi[K]>;
export type DerivedClient = { [K in OperationName]: ClientMethod<K> };

// A renamed or retyped operation stops this line from compiling.
const sameShape = (c: DerivedClient): LabApi => c;

/** Builds a LabApi whose every method forwards to `call`; errors arrive as LabError. */
export function makeClient(call: CallFn): LabApi {
  const client: Partial<Record<OperationName, (...args: unknown[]) => Promise<unknown>>> = {};
  for (const op of Object.keys(OPERATIONS) as OperationName[]) {
    client[op] = (...args: unknown[]) => call(op, args);
  }
  return sameShape(client as DerivedClient);
}

type FetchFn = (
  input: string,
  init: { method: string; headers: Record<string, string>; body: string },
) => Promise<{
  status: number;
  text(): Promise<string>;
}>;

/** A client over the loopback server: POST {args} to `${baseUrl}/api/<op>`. '' means same origin
 * (the page's cookie carries the server's token); other clients pass the token. */
export function httpClient(baseUrl: string, fetchFn: FetchFn = fetch, token?: string): LabApi {
  const base = baseUrl.replace(/\/+$/, '');
  return makeClient(async (op, args) => {
    let text: string;
    let status: number;
    try {
      const res = await fetchFn(`${base}/api/${op}`, {
        method: 'POST',
        headers: {
          'content-type': 'application/json',
          accept: 'application/json',
          ...(token === undefined ? {} : { 'x-dipledger-token': token }),
        },
        body: encodeWire({ args }),
      });
      status = res.status;
      text = await res.text();
    } catch (e) {
      throw new LabError(
        'internal',
        `cannot reach the lab service: ${e instanceof Error ? e.message : String(e)}`,
      );
    }
    let envelope: unknown;
    try {
      envelope = decodeWire(text);
    } catch {
      throw new LabError('internal', `the lab service answered HTTP ${status} without a readable result`);
    }
    return unwrap(envelope);
  });
}

/** What the desktop preload exposes as `window.dipledger`. */
export interface DesktopBridge {
  call(op: string, args: unknown[]): Promise<unknown>;
}

/** A client over the desktop IPC bridge; the bridge answers with the same envelope as HTTP. */
export function ipcClient(bridge: DesktopBridge): LabApi {
  return makeClient(async (op, args) => unwrap(await bridge.call(op, args)));
}
