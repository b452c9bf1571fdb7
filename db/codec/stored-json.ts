// Reading a stored JSON column: a point result stored packed (format 2, point-pack2.ts, or
// format 1, point-pack.ts) reads as the result it holds; any other text is the lab's JSON
// dialect (app/model/json.ts). Writing is encodeJson, or a packer for point results.
import { decodeJson, reviveNonFinite } from '../../app/model/json';
import { PACK_MARK_1, unpackPointResult1 } from './point-pack';
import { PACK_MARK_2, unpackPointResult2 } from './point-pack2';

export { encodeJson } from '../../app/model/json';

/** The value of a stored JSON text, dispatching on the mark a packed point result begins with. */
export function decodeStoredJson(text: string): unknown {
  if (text.startsWith(PACK_MARK_2)) {
    const packed = unpackPointResult2(text);
    if (packed !== undefined) return packed;
  }
  if (!text.startsWith(PACK_MARK_1)) return decodeJson(text);
  const value = reviveNonFinite(JSON.parse(text) as unknown, '');
  return unpackPointResult1(value) ?? value;
}
