// The chart of error against frequency on certificates: the tolerance band of the meter's
// stated accuracy, the acceptance limits of the decision rule where they differ, and each
// point's error with its expanded uncertainty U as a bar. Drawn with pdfkit vector graphics so
// it stays sharp in print and adds no image to the archive.
import type { CheckRecord, Meter } from '../model/records';
import { roundTicks, tickLabels } from '../model/quantity-format';
import { ACCENT, INK, MUTED, RULE, type Page } from './pdf';

export interface ChartBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Round tick values (1, 2, 5 × 10ⁿ apart) giving about `count` intervals over [lo, hi]. */
export function niceTicks(lo: number, hi: number, count = 6): number[] {
  return roundTicks(lo, hi, count);
}

/** Stated tolerance at a frequency, ppm of reading. */
export function tolerancePpm(meter: Pick<Meter, 'accuracyRelPpm' | 'accuracyAbsHz'>, hz: number): number {
  return meter.accuracyRelPpm + (meter.accuracyAbsHz / hz) * 1e6;
}

export function drawErrorChart(page: Page, box: ChartBox, meter: Meter, check: CheckRecord): void {
  const d = page.doc;
  const pts = check.points;
  const plot = { x: box.x + 52, y: box.y + 8, width: box.width - 64, height: box.height - 58 };

  // Frequency axis across the meter's band (the points sit inside it).
  const fLo = Math.min(meter.minHz, ...pts.map((p) => p.referenceHz)) / 1e9;
  const fHi = Math.max(meter.maxHz, ...pts.map((p) => p.referenceHz)) / 1e9;
  const fPad = (fHi - fLo) * 0.04 || fLo * 0.05;
  const xTicks = niceTicks(fLo - fPad, fHi + fPad, 7);
  const x0 = Math.min(fLo - fPad, xTicks[0] ?? fLo);
  const x1 = Math.max(fHi + fPad, xTicks[xTicks.length - 1] ?? fHi);

  // Error axis: the tolerance band and every error ± U must fit.
  const samples = 60;
  const bandHz = Array.from(
    { length: samples + 1 },
    (_, i) => meter.minHz + ((meter.maxHz - meter.minHz) * i) / samples,
  );
  const tolMax = Math.max(...bandHz.map((f) => tolerancePpm(meter, f)));
  const reach = Math.max(tolMax, ...pts.map((p) => Math.abs(p.result.errorPpm) + p.result.expandedPpm));
  const yTicks = niceTicks(-reach * 1.1, reach * 1.1, 8);
  const y0 = Math.min(-reach * 1.1, yTicks[0] ?? -reach);
  const y1 = Math.max(reach * 1.1, yTicks[yTicks.length - 1] ?? reach);

  const X = (ghzValue: number) => plot.x + ((ghzValue - x0) / (x1 - x0)) * plot.width;
  const Y = (ppm: number) => plot.y + plot.height - ((ppm - y0) / (y1 - y0)) * plot.height;

  d.save();
  // Tolerance band, shaded.
  d.moveTo(X(meter.minHz / 1e9), Y(tolerancePpm(meter, meter.minHz)));
  for (const f of bandHz) d.lineTo(X(f / 1e9), Y(tolerancePpm(meter, f)));
  for (const f of [...bandHz].reverse()) d.lineTo(X(f / 1e9), Y(-tolerancePpm(meter, f)));
  d.closePath().fillColor('#dcebdc').fill();

  // Grid and axes.
  d.lineWidth(0.3).strokeColor('#cccccc');
  for (const t of xTicks)
    d.moveTo(X(t), plot.y)
      .lineTo(X(t), plot.y + plot.height)
      .stroke();
  for (const t of yTicks)
    d.moveTo(plot.x, Y(t))
      .lineTo(plot.x + plot.width, Y(t))
      .stroke();
  d.lineWidth(0.8).strokeColor(INK).rect(plot.x, plot.y, plot.width, plot.height).stroke();
  d.lineWidth(0.6)
    .moveTo(plot.x, Y(0))
    .lineTo(plot.x + plot.width, Y(0))
    .stroke();

  // Tolerance limits as solid lines; acceptance limits (tolerance less guard band) dashed.
  d.lineWidth(1).strokeColor('#2e7d32');
  for (const sign of [1, -1]) {
    bandHz.forEach((f, i) => {
      const yy = Y(sign * tolerancePpm(meter, f));
      if (i === 0) d.moveTo(X(f / 1e9), yy);
      else d.lineTo(X(f / 1e9), yy);
    });
    d.stroke();
  }
  const guarded = pts.some((p) => p.result.decision.guardBandHz > 0);
  if (guarded) {
    d.lineWidth(0.8).strokeColor('#b26a00').dash(3, { space: 2 });
    for (const sign of [1, -1]) {
      pts.forEach((p, i) => {
        const acc = (p.result.decision.acceptanceLimitHz / p.referenceHz) * 1e6;
        const xx = X(p.referenceHz / 1e9);
        if (i === 0) d.moveTo(xx, Y(sign * acc));
        else d.lineTo(xx, Y(sign * acc));
      });
      d.stroke();
    }
    d.undash();
  }

  // Points with U bars: as found as circles, as left as squares.
  for (const p of pts) {
    const xx = X(p.referenceHz / 1e9) + (p.phase === 'as-left' ? 3 : check.adjusted ? -3 : 0);
    const e = p.result.errorPpm;
    const u = p.result.expandedPpm;
    const color = p.result.decision.verdict === 'pass' ? ACCENT : '#b00020';
    d.lineWidth(0.9).strokeColor(color);
    d.moveTo(xx, Y(e - u))
      .lineTo(xx, Y(e + u))
      .stroke();
    d.moveTo(xx - 3, Y(e - u))
      .lineTo(xx + 3, Y(e - u))
      .stroke();
    d.moveTo(xx - 3, Y(e + u))
      .lineTo(xx + 3, Y(e + u))
      .stroke();
    if (p.phase === 'as-left')
      d.rect(xx - 2.4, Y(e) - 2.4, 4.8, 4.8)
        .fillColor(color)
        .fill();
    else d.circle(xx, Y(e), 2.6).fillColor(color).fill();
  }

  // Tick labels and axis titles with units.
  page.font('regular', 7);
  d.fillColor(INK);
  const xLabels = tickLabels(xTicks);
  const yLabels = tickLabels(yTicks);
  for (const t of xTicks) {
    const label = xLabels[xTicks.indexOf(t)] ?? '';
    const w = d.widthOfString(label);
    d.text(label, X(t) - w / 2, plot.y + plot.height + 4, { lineBreak: false });
  }
  for (const t of yTicks) {
    const label = yLabels[yTicks.indexOf(t)] ?? '';
    const w = d.widthOfString(label);
    d.text(label, plot.x - 4 - w, Y(t) - 3.5, { lineBreak: false });
  }
  page.font('regular', 8);
  const xTitle = 'Frequency / GHz';
  d.text(xTitle, plot.x + (plot.width - d.widthOfString(xTitle)) / 2, plot.y + plot.height + 15, {
    lineBreak: false,
  });
  const yTitle = 'Error / ppm of reading';
  d.save();
  d.rotate(-90, { origin: [box.x + 10, plot.y + plot.height / 2] });
  d.text(yTitle, box.x + 10 - d.widthOfString(yTitle) / 2, plot.y + plot.height / 2 - 4, {
    lineBreak: false,
  });
  d.restore();

  // Legend under the plot.
  let ly = plot.y + plot.height + 30;
  let lx = plot.x;
  page.font('regular', 7);
  // Entries flow left to right and wrap to a second line rather than run off the page.
  const item = (draw: (x: number, y: number) => void, label: string) => {
    const w = 14 + d.widthOfString(label) + 14;
    if (lx + w > plot.x + plot.width + 12) {
      lx = plot.x;
      ly += 11;
    }
    draw(lx, ly + 3);
    d.fillColor(MUTED).text(label, lx + 14, ly, { lineBreak: false });
    lx += w;
  };
  item((x, y) => {
    d.rect(x, y - 3, 10, 6)
      .fillColor('#dcebdc')
      .fill();
    d.lineWidth(1)
      .strokeColor('#2e7d32')
      .moveTo(x, y - 3)
      .lineTo(x + 10, y - 3)
      .stroke();
  }, 'tolerance (stated accuracy)');
  if (guarded)
    item((x, y) => {
      d.lineWidth(0.8)
        .strokeColor('#b26a00')
        .dash(3, { space: 2 })
        .moveTo(x, y)
        .lineTo(x + 10, y)
        .stroke();
      d.undash();
    }, 'acceptance limit (tolerance less guard band)');
  item(
    (x, y) => {
      d.circle(x + 5, y, 2.6)
        .fillColor(ACCENT)
        .fill();
      d.lineWidth(0.9)
        .strokeColor(ACCENT)
        .moveTo(x + 5, y - 4)
        .lineTo(x + 5, y + 4)
        .stroke();
    },
    check.adjusted ? 'as found, error ± U' : 'error ± U',
  );
  if (check.adjusted)
    item((x, y) => {
      d.rect(x + 2.6, y - 2.4, 4.8, 4.8)
        .fillColor(ACCENT)
        .fill();
    }, 'as left, error ± U');
  if (pts.some((p) => p.result.decision.verdict !== 'pass'))
    item((x, y) => {
      d.circle(x + 5, y, 2.6)
        .fillColor('#b00020')
        .fill();
    }, 'not a plain pass (red)');
  d.restore();
  d.fillColor(INK).strokeColor(RULE);
}
