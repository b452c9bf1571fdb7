// The history CSV (docs/exchange.md): its columns, and the writer of the export, one row per
// reading of every point of every check. The reader of the same file is app/api/import-csv.ts
// (it validates each check as a recorded one); both take their columns from here, so an export
// imports back.
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import type { CheckRecord } from '../model/records';

export const CSV_COLUMNS = [
  'meter',
  'date',
  'performer',
  'standards',
  'method',
  'temperature_c',
  'u_temperature_c',
  'pressure_hpa',
  'u_pressure_hpa',
  'humidity_pct',
  'u_humidity_pct',
  'adjusted',
  'point',
  'phase',
  'reference_hz',
  'standard',
  'reading',
  'reading_unit',
  'direction',
  'dip_depth_db',
  'remarks',
] as const;

/** One check as the export writes it, with the unit its meter's dial reads in. */
export interface HistoryCsvCheck {
  check: CheckRecord;
  readingUnit: 'Hz' | 'div';
}

/** The rows of one check, in CSV_COLUMNS order. */
export function historyCsvRows({ check: c, readingUnit }: HistoryCsvCheck): (string | number)[][] {
  const rows: (string | number)[][] = [];
  for (const p of c.points) {
    for (const r of p.readings) {
      rows.push([
        c.meterAssetId,
        c.date,
        c.performer,
        c.standards.join(';'),
        c.method,
        c.conditions.temperatureC,
        c.conditions.temperatureUncertaintyC,
        c.conditions.pressureHpa,
        c.conditions.pressureUncertaintyHpa,
        c.conditions.humidityPct,
        c.conditions.humidityUncertaintyPct,
        c.adjusted ? 'yes' : 'no',
        p.seq,
        p.phase,
        p.referenceHz,
        p.standardAssetId,
        r.value,
        readingUnit,
        r.direction,
        p.dipDepthDb ?? '',
        c.remarks,
      ]);
    }
  }
  return rows;
}

/** The whole file: the header, then every check's rows in the order given (RFC 4180, CRLF). */
export function writeHistoryCsv(checks: Iterable<HistoryCsvCheck>): string {
  const rows: (string | number)[][] = [CSV_COLUMNS.slice()];
  for (const c of checks) for (const row of historyCsvRows(c)) rows.push(row);
  return stringifyCsv(rows, { record_delimiter: '\r\n' });
}
