// The report's look: a workshop palette (metals and patinas on drafting paper) shared by the
// page styles and the plots, so both read as one document.

export const INK = '#1d2630';
export const PAPER = '#f6f3ec';
export const CARD = '#fffdf8';
export const RULE = '#d9d2c3';
export const MUTED = '#6b6f73';
export const ACCENT = '#b0562f';
export const ACCENT_SOFT = '#ecd3c2';
export const GOOD = '#2f7a5d';
export const WARN = '#b7791f';
export const BAD = '#a33a3a';

/** Ring colours: copper, verdigris, brass, steel, garnet, jade, amethyst, pewter, then repeat. */
export const RING_COLOURS = [
  '#c0703f', '#3f8f80', '#c9a227', '#4b74a8', '#a8475e', '#6a9a45', '#8467ad', '#7b7f8c',
];

export const SYMMETRIC_COLOUR = '#4b74a8';
export const BROKEN_COLOUR = '#c0703f';

export function ringColour(index: number): string {
  return RING_COLOURS[index % RING_COLOURS.length]!;
}

/** Colour of a solve status in plots and badges. */
export function statusColour(status: string): string {
  switch (status) {
    case 'optimal': return GOOD;
    case 'stalled': return WARN;
    default: return BAD;
  }
}

export const FONT_STACK =
  "'Iosevka Aile', 'IBM Plex Sans', 'Source Sans 3', 'Segoe UI', system-ui, -apple-system, sans-serif";
export const MONO_STACK = "'Iosevka', 'IBM Plex Mono', 'DejaVu Sans Mono', ui-monospace, monospace";

/** Plot layout defaults common to every 2D figure. */
export function baseLayout(): Record<string, unknown> {
  return {
    paper_bgcolor: CARD,
    plot_bgcolor: CARD,
    font: { family: FONT_STACK, color: INK, size: 13 },
    margin: { l: 64, r: 24, t: 16, b: 56 },
    hoverlabel: { bgcolor: INK, font: { color: PAPER, family: FONT_STACK } },
    legend: { orientation: 'h', y: -0.22, x: 0, bgcolor: 'rgba(0,0,0,0)' },
    xaxis: axis(),
    yaxis: axis(),
  };
}

export function axis(extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    gridcolor: '#e8e1d3',
    zerolinecolor: RULE,
    linecolor: RULE,
    ticks: 'outside',
    tickcolor: RULE,
    automargin: true,
    ...extra,
  };
}

export const PAGE_CSS = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0; background: ${PAPER}; color: ${INK}; font: 15px/1.5 ${FONT_STACK}; }
header.masthead { background: ${INK}; color: ${PAPER}; padding: 28px 40px 24px; border-bottom: 6px solid ${ACCENT}; }
header.masthead .kicker { text-transform: uppercase; letter-spacing: .14em; font-size: 12px; color: ${ACCENT_SOFT}; margin: 0 0 6px; }
header.masthead h1 { margin: 0; font-size: 28px; font-weight: 650; letter-spacing: -.01em; }
header.masthead .sub { margin: 6px 0 0; color: #c9cdd1; font-size: 14px; }
main { max-width: 1180px; margin: 0 auto; padding: 24px 40px 48px; }
.cards { display: grid; grid-template-columns: repeat(auto-fit, minmax(170px, 1fr)); gap: 12px; margin: 0 0 24px; }
.card { background: ${CARD}; border: 1px solid ${RULE}; border-radius: 6px; padding: 12px 14px; }
.card .label { font-size: 12px; color: ${MUTED}; text-transform: uppercase; letter-spacing: .08em; white-space: nowrap; overflow: hidden; text-overflow: ellipsis; }
.card .value { font-size: 22px; font-weight: 650; font-variant-numeric: tabular-nums; margin-top: 2px; }
.card .unit { font-size: 12px; color: ${MUTED}; }
section.block { background: ${CARD}; border: 1px solid ${RULE}; border-radius: 6px; margin: 0 0 22px; padding: 18px 22px 16px; }
section.block > h2 { font-size: 17px; margin: 0 0 2px; font-weight: 650; }
section.block > h2 .num { color: ${ACCENT}; margin-right: .5em; font-variant-numeric: tabular-nums; }
section.block > p.lead { margin: 0 0 12px; color: ${MUTED}; font-size: 14px; max-width: 80ch; }
.pair { display: grid; grid-template-columns: 1fr 1fr; gap: 16px; }
@media (max-width: 900px) { .pair { grid-template-columns: 1fr; } main { padding: 16px; } }
.plot { width: 100%; height: 420px; }
.plot.tall { height: 560px; }
.plot-title { font-size: 13px; font-weight: 600; color: ${MUTED}; margin: 4px 0 0; text-transform: uppercase; letter-spacing: .08em; }
table.figures { border-collapse: collapse; width: 100%; font-variant-numeric: tabular-nums; font-size: 14px; }
table.figures th, table.figures td { text-align: left; padding: 6px 10px; border-bottom: 1px solid #ece6d9; vertical-align: top; }
table.figures thead th { font-size: 12px; text-transform: uppercase; letter-spacing: .07em; color: ${MUTED}; border-bottom: 2px solid ${RULE}; }
table.figures th.n { text-align: right; }
table.figures td.n { text-align: right; font-family: ${MONO_STACK}; font-size: 13px; white-space: nowrap; }
table.figures td.u { color: ${MUTED}; font-size: 13px; }
table.figures tr:hover td { background: #faf5ea; }
.badge { display: inline-block; padding: 1px 9px; border-radius: 10px; font-size: 12px; font-weight: 600; color: #fff; letter-spacing: .03em; }
.badge.ok { background: ${GOOD}; } .badge.warn { background: ${WARN}; } .badge.bad { background: ${BAD}; }
.note { font-size: 13px; color: ${MUTED}; margin: 10px 0 0; }
details { margin-top: 10px; } summary { cursor: pointer; color: ${ACCENT}; font-weight: 600; font-size: 14px; }
ul.cautions { margin: 6px 0 0; padding-left: 20px; } ul.cautions li { margin: 3px 0; }
footer { color: ${MUTED}; font-size: 12px; text-align: center; padding: 0 0 32px; }
code { font-family: ${MONO_STACK}; font-size: 13px; background: #f0eadd; padding: 0 4px; border-radius: 3px; }
`;
