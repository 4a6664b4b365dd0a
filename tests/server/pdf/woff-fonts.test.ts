// The shipped WOFF fonts unpacked for pdfkit, checked against what each WOFF file says about the
// font it wraps (W3C WOFF File Format 1.0, section 4: totalSfntSize; section 5: origChecksum, the
// OpenType table checksum of the unpacked table; OpenType spec, "Calculating checksums").
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { FONTS } from '../../../server/pdf/document.js';
import { woffToSfnt } from '../../../server/pdf/woff.js';

/** OpenType table checksum: the table as big-endian uint32 words, zero-padded, summed mod 2^32. */
function tableChecksum(bytes: Buffer): number {
  const padded = Buffer.alloc((bytes.length + 3) & ~3);
  bytes.copy(padded);
  let sum = 0;
  for (let i = 0; i < padded.length; i += 4) sum = (sum + padded.readUInt32BE(i)) >>> 0;
  return sum;
}

describe('the PDF fonts', () => {
  for (const [name, file] of Object.entries(FONTS)) {
    it(`unpacks ${name} to the size and table checksums its WOFF header records`, () => {
      const woff = readFileSync(file);
      const sfnt = woffToSfnt(woff);
      expect(sfnt.length).toBe(woff.readUInt32BE(16));
      const numTables = sfnt.readUInt16BE(4);
      expect(numTables).toBe(woff.readUInt16BE(12));
      for (let i = 0; i < numTables; i++) {
        const record = 12 + i * 16;
        const tag = sfnt.subarray(record, record + 4).toString('latin1');
        const table = Buffer.from(sfnt.subarray(sfnt.readUInt32BE(record + 8), sfnt.readUInt32BE(record + 8) + sfnt.readUInt32BE(record + 12)));
        // The head table's checksum is taken with its checkSumAdjustment (bytes 8-11) as zero.
        if (tag === 'head') table.fill(0, 8, 12);
        const recorded = woff.readUInt32BE(44 + i * 20 + 16);
        expect({ tag, checksum: tableChecksum(table) }).toEqual({ tag, checksum: recorded });
      }
    });
  }
});
