import { createRequire } from 'node:module';
import PDFDocument from 'pdfkit';
import type { MonthlyStatement, StatementFigures } from '../../shared/contracts/statements';

/**
 * Inter from npm (@fontsource/inter), embedded and subset by pdfkit. The WOFF files, not WOFF2: fontkit's subsetter
 * fails on composite glyphs read from WOFF2 ("Offset is outside the bounds of the DataView"). Greek letters (γ) are
 * in a subset file of their own.
 */
const fontFile = (name: string) => createRequire(import.meta.url).resolve(`@fontsource/inter/files/${name}.woff`);
const FONTS = {
  regular: fontFile('inter-latin-400-normal'),
  bold: fontFile('inter-latin-700-normal'),
  greek: fontFile('inter-greek-400-normal'),
};

/** The usual cautions, printed on every statement (job.md §6, own wording). */
export const STATEMENT_CAUTIONS = [
  'Tracker structures move under remote and automatic control (including wind stow) and have pinch and crush points; keep clear of any unit that is not stowed, pinned and locked out.',
  'A software hold is not lockout/tagout: before maintenance, stow the unit and isolate and lock out every energy source, batteries included, as your site procedure and the manufacturer require.',
  'Photovoltaic modules are live whenever light falls on them and DC arcs do not put themselves out. Electrical work is for qualified, authorised persons only.',
  'Local codes, the authority having jurisdiction and licensed practice govern all work on site; this statement supports and does not replace them.',
];

const PAGE = { margin: 48, width: 595.28, height: 841.89 };
const GREY = '#555555';

const num = (x: number | null | undefined, digits = 1) => (x === null || x === undefined ? '—' : x.toFixed(digits));
const pct = (x: number | null | undefined, digits = 1) => (x === null || x === undefined ? '—' : `${(x * 100).toFixed(digits)} %`);
const signedPct = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${x >= 0 ? '+' : ''}${x.toFixed(1)} %`);

/** Replaces the few symbols outside the embedded subsets (Latin, Greek, general punctuation). */
const printable = (t: string) =>
  t
    .replace(/≈/g, '~')
    .replace(/≤/g, '<=')
    .replace(/≥/g, '>=')
    .replace(/[^\t\n\u0020-\u024f\u0370-\u03ff\u2000-\u206f\u20ac\u2122\u2212]/g, '?');

/** Renders a statement as an A4 PDF (pdfkit), in the site's calendar month. */
export function statementPdf(s: MonthlyStatement): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4',
    margin: PAGE.margin,
    info: { Title: `Monthly statement ${s.siteName} ${s.month}`, Author: 'Brightward', Subject: `Site ${s.siteId}, ${s.month}` },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((res, rej) => {
    doc.on('end', () => res(Buffer.concat(chunks)));
    doc.on('error', rej);
  });
  doc.registerFont('regular', FONTS.regular);
  doc.registerFont('bold', FONTS.bold);
  doc.registerFont('greek', FONTS.greek);
  const left = PAGE.margin;
  const width = PAGE.width - 2 * PAGE.margin;
  const bottom = PAGE.height - PAGE.margin;

  /** Text with Greek runs in the Greek subset. */
  const text = (t: string, opts: PDFKit.Mixins.TextOptions & { font?: 'regular' | 'bold' } = {}, at?: { x: number; y: number }) => {
    const runs = printable(t)
      .split(/([\u0370-\u03ff]+)/)
      .filter((r, i, all) => r || i === all.length - 1);
    const base = opts.font ?? 'regular';
    runs.forEach((run, i) => {
      const o = { ...opts, continued: i < runs.length - 1 };
      doc.font(/^[\u0370-\u03ff]+$/.test(run) ? 'greek' : base);
      if (i === 0 && at) doc.text(run, at.x, at.y, o);
      else doc.text(run, o);
    });
  };
  const room = (h: number) => {
    if (doc.y + h > bottom) doc.addPage();
  };
  const heading = (t: string) => {
    room(60);
    doc.moveDown(0.8).fillColor('black').fontSize(12);
    text(t, { font: 'bold' });
    doc.moveDown(0.3).fontSize(9);
  };
  /** A table: column widths as shares of the page width; the first row is the header. */
  const table = (shares: number[], rows: string[][]) => {
    const widths = shares.map((f) => f * width);
    rows.forEach((cells, r) => {
      doc.fontSize(8.5);
      const h =
        Math.max(...cells.map((c, i) => doc.font(r === 0 ? 'bold' : 'regular').heightOfString(printable(c), { width: widths[i]! - 4 }))) +
        3;
      if (doc.y + h > bottom) doc.addPage();
      const y = doc.y;
      let x = left;
      cells.forEach((c, i) => {
        doc.fillColor(r === 0 ? 'black' : '#222222');
        text(c, { width: widths[i]! - 4, font: r === 0 ? 'bold' : 'regular' }, { x, y });
        x += widths[i]!;
      });
      doc.x = left;
      doc.y = y + h;
    });
    doc.fillColor('black');
  };
  const figureRows = (f: StatementFigures) => [
    ['Energy (DC, as measured by the units)', `${num(f.energyKwh, 1)} kWh`],
    ['Rated power P0', `${num(f.p0Kwp, 2)} kWp`],
    ['Final yield Yf = E / P0', `${num(f.yfH, 2)} kWh/kWp`],
    ['In-plane irradiation Hi', `${num(f.hiKwhM2, 2)} kWh/m²`],
    ['Reference yield Yr = Hi / 1 kW/m²', `${num(f.yrH, 2)} h`],
    ['Performance ratio PR = Yf / Yr', num(f.pr, 3)],
    [`Temperature-corrected PR (PR_STC, γ = ${s.assumptions.gammaPctPerK.toFixed(2)} %/K)`, num(f.prStc, 3)],
    ['Data completeness (reports received / expected)', pct(f.completeness)],
    ['Share of daylight buckets modelled', pct(f.modelledShare)],
  ];

  // Title block.
  doc.fontSize(18);
  text(`Monthly statement — ${s.siteName}`, { font: 'bold' });
  doc.fontSize(10).fillColor(GREY);
  text(`Owner: ${s.ownerName}   ·   Site ${s.siteId}   ·   Month ${s.month} (${s.timeZone})`);
  text(`Period ${s.from} to ${s.to} (${s.hours} h in the site's time zone)${s.partial ? '   ·   month so far' : ''}`);
  if (s.lock)
    text(
      `Locked, version ${s.lock.version}${s.lock.state === 'superseded' ? ' (superseded by a restatement)' : ''}, ${s.lock.lockedAt}${s.lock.lockedBy ? ` by ${s.lock.lockedBy}` : ' (automatic lock)'}${s.lock.reason ? ` — restated: ${s.lock.reason}` : ''}`,
    );
  else text('Not locked: the figures may still change (a month locks on the 3rd of the next month at 06:00 site time).');
  if (s.lock) text(`SHA-256 of the content: ${s.lock.checksum}`);
  if (s.lock?.restatementSuggestedAt)
    text(`Data for this month arrived after the lock (${s.lock.restatementSuggestedAt}): a restatement is suggested.`);
  text(`Generated ${s.generatedAt}. ${s.assumptions.energy}`);
  doc.fillColor('black');

  heading('Yield and performance (IEC 61724-1)');
  table([0.6, 0.4], [['Quantity', 'Site'], ...figureRows(s.site)]);

  heading('Availability (daylight only)');
  const a = s.site.availability;
  table(
    [0.6, 0.2, 0.2],
    [
      ['Availability', 'Raw', 'Contractual'],
      ['Time-based', pct(a.timeRaw), pct(a.timeContractual)],
      ['Energy-based', pct(a.energyRaw), pct(a.energyContractual)],
    ],
  );
  doc.moveDown(0.3);
  text(
    `Daylight counted ${num(a.daylightH, 1)} h (in-plane irradiance above ${s.assumptions.daylightThresholdWm2} W/m²); down ${num(a.downH, 1)} h, of which ${num(a.excludedH, 1)} h excused; energy lost ${num(a.lostKwh, 1)} kWh, of which ${num(a.excludedLostKwh, 1)} kWh excused.`,
    { width },
  );
  heading('Excluded and downtime intervals (IEC TS 63019 categories)');
  if (!s.exclusions.length) text('None this month.');
  else
    table(
      [0.13, 0.22, 0.22, 0.08, 0.17, 0.1, 0.08],
      [
        ['Unit', 'From', 'To', 'min', 'Category', 'Source', 'Excused'],
        ...s.exclusions.map((e) => [
          e.serial,
          e.from,
          e.to,
          String(e.minutes),
          e.category,
          e.source + (e.ticketId ? ` #${e.ticketId}` : ''),
          e.excused ? 'yes' : 'no',
        ]),
      ],
    );

  heading('Losses against the modelled best reachable orientation');
  const l = s.site.losses;
  table(
    [0.6, 0.4],
    [
      ['Part', 'kWh'],
      ['Modelled best', num(l.modelledBestKwh)],
      ['Measured (modelled buckets)', num(l.measuredKwh)],
      ['Trapped on a lesser peak', num(l.trappedKwh)],
      ['Downtime (comms, stall, fault)', num(l.downtimeKwh)],
      ['Held', num(l.heldKwh)],
      ['Stowed', num(l.stowedKwh)],
      ['Soiling estimate', num(l.soilingKwh)],
      ['Residual', num(l.residualKwh)],
    ],
  );

  heading('Gain over simpler mounts (same measured weather)');
  const g = s.site.gains;
  table(
    [0.4, 0.3, 0.3],
    [
      ['Mount', 'Modelled energy [kWh]', 'Gain of this fleet'],
      ['Fixed-tilt twin (latitude tilt, facing the equator)', num(g.fixedTwinKwh), signedPct(g.gainOverFixedPct)],
      ['Sun-following twin (same travel limits)', num(g.sunTwinKwh), signedPct(g.gainOverSunPct)],
    ],
  );

  heading('Tickets of the month');
  table(
    [0.2, 0.2, 0.2, 0.2, 0.2],
    [
      ['Opened', 'Resolved', 'Closed', 'SLA met', 'MTTR'],
      [
        String(s.tickets.opened),
        String(s.tickets.resolved),
        String(s.tickets.closed),
        s.tickets.slaCompliancePct === null ? '—' : `${num(s.tickets.slaCompliancePct)} %`,
        s.tickets.mttrH === null ? '—' : `${num(s.tickets.mttrH)} h`,
      ],
    ],
  );

  heading('Units');
  table(
    [0.2, 0.16, 0.12, 0.12, 0.12, 0.14, 0.14],
    [
      ['Unit', 'Energy [kWh]', 'Yf [h]', 'PR', 'PR_STC', 'Avail. (contr.)', 'Complete'],
      ...s.units.map((u) => [
        u.serial,
        num(u.energyKwh),
        num(u.yfH, 2),
        num(u.pr, 3),
        num(u.prStc, 3),
        pct(u.availability.timeContractual),
        pct(u.completeness),
      ]),
    ],
  );

  heading('Days');
  table(
    [0.16, 0.08, 0.14, 0.14, 0.1, 0.1, 0.1, 0.09, 0.09],
    [
      ['Date', 'h', 'Energy [kWh]', 'Hi [kWh/m²]', 'Yf [h]', 'PR', 'Complete', 'vs fixed', 'vs sun'],
      ...s.days.map((d) => [
        d.date,
        String(d.hours),
        num(d.energyKwh),
        num(d.hiKwhM2, 2),
        num(d.yfH, 2),
        num(d.pr, 3),
        pct(d.completeness, 0),
        signedPct(d.gainOverFixedPct),
        signedPct(d.gainOverSunPct),
      ]),
    ],
  );

  heading('Model and assumptions');
  for (const m of [...s.assumptions.model, ...s.assumptions.notes]) {
    room(30);
    text(`• ${m}`, { width });
  }

  heading('Cautions');
  for (const c of STATEMENT_CAUTIONS) {
    room(30);
    text(`• ${c}`, { width });
  }
  doc.end();
  return done;
}
