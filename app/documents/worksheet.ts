// The bench worksheet, printed before a check: the points to check across the meter's band,
// columns to write readings in both directions of approach, boxes for the conditions and the
// sources used, and the cautions of the work. Not an issued document: it has no number.
import { divisionsAtFrequency } from '../engine';
import type { WorksheetData } from './model';
import { certificateOn } from './model';
import { MUTED, PAGE, Page } from './pdf';
import { accuracyText, band, dialText, ghz, ghzDecimals, num } from './words';

export const WORKSHEET_TITLE = 'Bench worksheet';

export function worksheetCautions(maxInputPowerW: number): string[] {
  return [
    `Maximum input power of this meter: ${num(maxInputPowerW, 3)} W. Set the source level before connecting; exceeding it can damage the cavity, its coupling or the detector. Quarantine a meter that has been overdriven.`,
    'RF exposure: near open waveguide, horns or unterminated ports at high power, exposure can exceed safe limits. Switch the source off or terminate the line before opening a connection; follow the site RF safety rules.',
    "Verdicts computed from these readings support, and never replace, the lab's quality system, the judgement of competent staff, local regulations and accredited practice.",
  ];
}

export function renderWorksheet(data: WorksheetData): Buffer {
  const { meter, lab } = data;
  const id = `Worksheet ${meter.assetId} printed ${data.printedOn}`;
  const page = new Page({
    title: WORKSHEET_TITLE,
    identification: id,
    labName: lab.name,
    author: lab.name,
    subject: `Bench worksheet for ${meter.assetId}`,
    keywords: `${meter.assetId}; worksheet`,
    createdAt: `${data.printedOn}T00:00:00.000Z`,
  });
  const d = page.doc;
  page.font('bold', 18);
  d.text(WORKSHEET_TITLE, PAGE.margin, page.y, { lineBreak: false });
  page.y += 24;
  page.font('regular', 10);
  d.fillColor(MUTED).text(`${meter.assetId}: ${meter.description}`, PAGE.margin, page.y, {
    lineBreak: false,
  });
  d.fillColor('#111111');
  page.y += 18;

  page.cautions('Cautions', worksheetCautions(meter.maxInputPowerW));

  page.heading('Meter');
  page.fields([
    ['Band', `${band(meter)}; ${meter.construction}, ${meter.port || 'port not recorded'}`],
    ['Dial', dialText(meter)],
    ['Stated accuracy', accuracyText(meter)],
    ['Minimum dip; location', `${num(meter.minDipDb, 3)} dB; ${meter.location || 'location not recorded'}`],
  ]);

  page.heading('Conditions (write at the start and at the end)');
  page.table(
    [
      { title: '', width: 8 },
      { title: 'Time', width: 10 },
      { title: 'Temperature / °C', width: 14 },
      { title: 'Pressure / hPa', width: 14 },
      { title: 'Humidity / %RH', width: 14 },
    ],
    [
      ['start', '', '', '', ''],
      ['end', '', '', '', ''],
    ],
    { rowHeight: 16 },
  );

  page.heading('Sources used (tick; the certificate must be valid today)');
  const usable = data.standards.filter((s) => certificateOn(s, data.printedOn));
  page.table(
    [
      { title: 'Used', width: 5 },
      { title: 'Standard', width: 10 },
      { title: 'Description', width: 40 },
      { title: 'Certificate', width: 15 },
      { title: 'Due', width: 10 },
    ],
    [
      // The first clause of the description is enough to pick a source at the bench.
      ...usable.map((s) => [
        '☐',
        s.assetId,
        s.description.split(/[,.;]/)[0] ?? '',
        s.certificates[0]?.certificateId ?? '-',
        s.dueOn,
      ]),
      ['☐', '', '', '', ''],
    ],
    { rowHeight: 15 },
  );
  if (usable.length < data.standards.length)
    page.paragraph(
      `Not listed: ${data.standards.length - usable.length} standard(s) without a certificate valid on ${data.printedOn}.`,
      { size: 8, color: MUTED },
    );

  page.heading('Readings');
  const direct = meter.dialKind === 'direct';
  const decimals = ghzDecimals(direct ? meter.resolution / 10 : 1e3);
  page.paragraph(
    direct
      ? 'Source at the reference; tune to the dip from below (↑ up) and from above (↓ down); write the dial reading in GHz.'
      : 'Source at the reference; tune to the dip from below (↑ up) and from above (↓ down); write divisions (chart setting given).',
    { size: 8.5 },
  );
  page.table(
    [
      { title: 'Point', width: 5, align: 'right' },
      { title: 'Reference / GHz', width: 12, align: 'right' },
      ...(direct ? [] : [{ title: 'Chart / div', width: 8, align: 'right' as const }]),
      { title: '↑ up 1', width: 10 },
      { title: '↑ up 2', width: 10 },
      { title: '↓ down 1', width: 10 },
      { title: '↓ down 2', width: 10 },
      { title: 'Dip / dB', width: 7 },
      { title: 'Remarks', width: 14 },
    ],
    [
      ...meter.planHz.map((f, i) => {
        let chartDiv = '';
        if (!direct && meter.chart.length > 1) {
          try {
            chartDiv = divisionsAtFrequency(meter.chart, f).toFixed(2);
          } catch {
            chartDiv = 'off chart';
          }
        }
        return [String(i + 1), ghz(f, decimals), ...(direct ? [] : [chartDiv]), '', '', '', '', '', ''];
      }),
      ['', '', ...(direct ? [] : ['']), '', '', '', '', '', ''],
    ],
    { rowHeight: 17 },
  );

  page.gap(4);
  page.boxes(['adjusted? (yes / no; as left on a 2nd sheet)', 'performed by (name)', 'date'], 20);
  page.end(`End of worksheet for ${meter.assetId}`);
  return page.finish();
}
