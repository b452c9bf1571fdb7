// Chart rows of a micrometer meter as a technician pastes them from a spreadsheet or a CSV file:
// one row a line, divisions then frequency, separated by a comma, semicolon, tab or "=".
// Never throws: rows it cannot read come back as problems naming the line.

export interface ChartRow {
  divisions: number;
  frequency: string;
}

export interface ChartRowsRead {
  rows: ChartRow[];
  problems: string[];
}

export function readChartRows(text: string): ChartRowsRead {
  const rows: ChartRow[] = [];
  const problems: string[] = [];
  text.split(/\r?\n/).forEach((raw, i) => {
    const line = raw.trim();
    if (!line) return;
    const [d, ...rest] = line.split(/\s*[,;\t=]\s*/);
    const f = rest.join(' ').trim();
    const divisions = Number(d);
    // A header line of a CSV file ("divisions,frequency") is passed over.
    if (i === 0 && !Number.isFinite(divisions) && /[a-z]/i.test(line)) return;
    if (d === undefined || d === '' || !Number.isFinite(divisions) || !f) {
      problems.push(`line ${i + 1}: "${line}": expected divisions and a frequency, such as "12.5, 9.3 GHz"`);
      return;
    }
    rows.push({ divisions, frequency: f });
  });
  return { rows, problems };
}

const UNITS: Record<string, number> = { hz: 1, khz: 1e3, mhz: 1e6, ghz: 1e9, thz: 1e12 };

/** The frequency of a row in Hz for the preview chart, or NaN (the service judges it on saving). */
export function previewHz(text: string): number {
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)\s*([a-z]*)\s*$/i.exec(text);
  if (!m) return NaN;
  const unit = UNITS[(m[2] ?? '').toLowerCase()];
  return unit === undefined ? NaN : Number(m[1]) * unit;
}
