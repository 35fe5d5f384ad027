/**
 * @module crc32
 * CRC-32 as used by ZIP and PNG: the reflected polynomial 0xEDB88320 with a 256-entry table,
 * initial value and final XOR 0xFFFFFFFF (ISO 3309; PNG specification, W3C 2003, Annex D "Sample
 * CRC implementation"). Check value: CRC-32 of "123456789" is 0xCBF43926 (common practice).
 */

const TABLE = (() => {
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

/** The CRC-32 of `data` (optionally continuing from a previous CRC). */
export function crc32(data: Uint8Array, previous = 0): number {
  let c = (previous ^ 0xffffffff) >>> 0;
  for (let i = 0; i < data.length; i++) c = TABLE[(c ^ data[i]) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
