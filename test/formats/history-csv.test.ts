// The history CSV writer (app/formats/history-csv.ts): one row per reading in CSV_COLUMNS order,
// RFC 4180 text (CRLF line ends, a field with a comma, quote or line break quoted, quotes
// doubled: RFC 4180 section 2), read back by csv-parse as written.
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { CSV_COLUMNS, writeHistoryCsv } from '../../app/formats/history-csv';
import type { CheckRecord } from '../../app/model/records';

// Only the fields the writer reads (the invented bench of the demo lab's kind).
const check = {
  meterAssetId: 'WG-201',
  date: '2026-03-02',
  performer: 'Ravi Ostrander',
  standards: ['SG-1', 'FC-2'],
  method: 'direct',
  conditions: {
    temperatureC: 21.5,
    temperatureUncertaintyC: 0.3,
    pressureHpa: 1009,
    pressureUncertaintyHpa: 1,
    humidityPct: 45,
    humidityUncertaintyPct: 5,
  },
  adjusted: false,
  remarks: 'dial "sticky", cleaned\nthen read',
  points: [
    {
      seq: 1,
      phase: 'as-found',
      referenceHz: 9.3e9,
      standardAssetId: 'SG-1',
      dipDepthDb: null,
      readings: [
        { value: 14.7775, direction: 'up' },
        { value: 14.78, direction: 'down' },
      ],
    },
  ],
} as unknown as CheckRecord;

describe('history CSV writer', () => {
  it('writes the header and one row per reading, read back as written', () => {
    const text = writeHistoryCsv([{ check, readingUnit: 'div' }]);
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = parse(text) as string[][];
    expect(rows[0]).toEqual([...CSV_COLUMNS]);
    expect(rows).toHaveLength(3);
    const row = Object.fromEntries(CSV_COLUMNS.map((c, i) => [c, rows[1]![i]]));
    expect(row).toMatchObject({
      meter: 'WG-201',
      standards: 'SG-1;FC-2',
      temperature_c: '21.5',
      adjusted: 'no',
      point: '1',
      reference_hz: '9300000000',
      reading: '14.7775',
      reading_unit: 'div',
      direction: 'up',
      dip_depth_db: '',
      remarks: 'dial "sticky", cleaned\nthen read',
    });
    expect(rows[2]![CSV_COLUMNS.indexOf('direction')]).toBe('down');
    // The remark quoted, its quotes doubled (RFC 4180 section 2, rules 6 and 7).
    expect(text).toContain('"dial ""sticky"", cleaned\nthen read"');
  });

  it('writes only the header without checks', () => {
    expect(writeHistoryCsv([])).toBe(`${CSV_COLUMNS.join(',')}\r\n`);
  });
});
