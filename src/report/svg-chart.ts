// Frequency-response charts as SVG: per gain, magnitude in dB over log frequency with the gain
// window (shaded), the spec band edges and the −3 dB corners marked, and the phase below it.
// A small pure renderer (a few dozen elements per chart; a charting library would bring a DOM or
// a canvas for what is two polylines and some lines). Drawn only from the results document's
// `gains[].response`; names from the circuit file are XML-escaped.
import type { CircuitResult, GainEntry, ResponsePoint } from "./document.js";
import { inertText } from "./untrusted.js";
import { formatSiPrefixed } from "../units/si-format.js";

export const CHART_WIDTH = 720;
const MAG_HEIGHT = 220;
const PHASE_HEIGHT = 130;
const LEFT = 58;
const RIGHT = 18;
const TOP = 34;
const GAP = 34;
const BOTTOM = 34;
/** Coordinates are written with two decimals: 0.01 px, far finer than any screen. */
const DECIMALS = 2;

export function xmlEscape(text: string): string {
  return inertText(text).replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&apos;");
}

const hz = (f: number): string => formatSiPrefixed(f, "Hz", { significant: 3 });
const fix = (v: number): string => v.toFixed(DECIMALS);
const dbOf = (v: number): number => 20 * Math.log10(Math.abs(v));

/** The mapping from data to pixels of one gain's chart; exported so tests can invert it. */
export interface ChartScale {
  readonly x: (f: number) => number;
  readonly yDb: (db: number) => number;
  readonly yPhase: (deg: number) => number;
  readonly fMin: number;
  readonly fMax: number;
  readonly dbMin: number;
  readonly dbMax: number;
  readonly height: number;
}

export function chartScale(g: GainEntry): ChartScale | null {
  const pts = (g.response?.points ?? []).filter((p): p is ResponsePoint & { db: number } => p.db !== null && Number.isFinite(p.db));
  if (pts.length < 2) return null;
  const fMin = pts[0]!.frequency;
  const fMax = pts[pts.length - 1]!.frequency;
  const dbs = pts.map((p) => p.db);
  for (const w of [g.window.min, g.window.max]) if (w !== 0 && Number.isFinite(dbOf(w))) dbs.push(dbOf(w));
  const dbMax = Math.ceil((Math.max(...dbs) + 3) / 10) * 10;
  // Keep at least 60 dB of range below the top so a deep low-frequency roll-off stays readable.
  const dbMin = Math.max(Math.floor((Math.min(...dbs) - 3) / 10) * 10, dbMax - 120);
  const plotW = CHART_WIDTH - LEFT - RIGHT;
  const lf = Math.log10(fMin);
  const span = Math.log10(fMax) - lf || 1;
  const x = (f: number): number => LEFT + ((Math.log10(f) - lf) / span) * plotW;
  const yDb = (db: number): number => TOP + ((dbMax - Math.max(dbMin, Math.min(dbMax, db))) / (dbMax - dbMin)) * MAG_HEIGHT;
  const phaseTop = TOP + MAG_HEIGHT + GAP;
  const yPhase = (deg: number): number => phaseTop + ((180 - deg) / 360) * PHASE_HEIGHT;
  return { x, yDb, yPhase, fMin, fMax, dbMin, dbMax, height: TOP + MAG_HEIGHT + GAP + PHASE_HEIGHT + BOTTOM };
}

function trace(points: readonly ResponsePoint[], x: (f: number) => number, y: (v: number) => number, pick: (p: ResponsePoint) => number | null): string {
  let d = "";
  let pen = false;
  for (const p of points) {
    const v = pick(p);
    if (v === null || !Number.isFinite(v)) {
      pen = false;
      continue;
    }
    d += `${pen ? "L" : "M"}${fix(x(p.frequency))} ${fix(y(v))} `;
    pen = true;
  }
  return d.trim();
}

function decades(fMin: number, fMax: number): number[] {
  const out: number[] = [];
  for (let e = Math.ceil(Math.log10(fMin) - 1e-9); e <= Math.floor(Math.log10(fMax) + 1e-9); e++) out.push(10 ** e);
  return out;
}

/** One gain's chart as an SVG `<g>` translated to `top`; "" when the response has no points. */
function gainChart(g: GainEntry, top: number): { svg: string; height: number } {
  const s = chartScale(g);
  const name = xmlEscape(g.name);
  if (!s) {
    const why = xmlEscape(g.response?.error ?? "no frequency response in the results document");
    return { svg: `<g transform="translate(0 ${top})" class="chart empty" data-gain="${name}"><text x="${LEFT}" y="20" class="title">${name}: ${why}</text></g>`, height: 36 };
  }
  const r = g.response!;
  const plotRight = CHART_WIDTH - RIGHT;
  const phaseTop = TOP + MAG_HEIGHT + GAP;
  const parts: string[] = [];
  const title = `${name} — magnitude (dB) and phase (°) against frequency`;
  parts.push(`<text x="${LEFT}" y="18" class="title">${title}</text>`);
  // Frames and grid.
  parts.push(`<rect x="${LEFT}" y="${TOP}" width="${fix(plotRight - LEFT)}" height="${MAG_HEIGHT}" class="frame"/>`);
  parts.push(`<rect x="${LEFT}" y="${phaseTop}" width="${fix(plotRight - LEFT)}" height="${PHASE_HEIGHT}" class="frame"/>`);
  for (const f of decades(s.fMin, s.fMax)) {
    const xf = fix(s.x(f));
    parts.push(`<line x1="${xf}" y1="${TOP}" x2="${xf}" y2="${TOP + MAG_HEIGHT}" class="grid"/>`);
    parts.push(`<line x1="${xf}" y1="${phaseTop}" x2="${xf}" y2="${phaseTop + PHASE_HEIGHT}" class="grid"/>`);
    parts.push(`<text x="${xf}" y="${phaseTop + PHASE_HEIGHT + 16}" class="tick" text-anchor="middle">${xmlEscape(hz(f))}</text>`);
  }
  const step = (s.dbMax - s.dbMin) / 10 > 6 ? 20 : 10;
  for (let db = s.dbMin; db <= s.dbMax; db += step) {
    const y = fix(s.yDb(db));
    parts.push(`<line x1="${LEFT}" y1="${y}" x2="${fix(plotRight)}" y2="${y}" class="grid"/>`);
    parts.push(`<text x="${LEFT - 6}" y="${y}" class="tick" text-anchor="end" dominant-baseline="middle">${db} dB</text>`);
  }
  for (const deg of [-180, -90, 0, 90, 180]) {
    const y = fix(s.yPhase(deg));
    parts.push(`<line x1="${LEFT}" y1="${y}" x2="${fix(plotRight)}" y2="${y}" class="grid"/>`);
    parts.push(`<text x="${LEFT - 6}" y="${y}" class="tick" text-anchor="end" dominant-baseline="middle">${deg}°</text>`);
  }
  // The gain window: |min| … |max| in dB (a window through zero reaches the bottom).
  const lo = Math.min(Math.abs(g.window.min), Math.abs(g.window.max));
  const hi = Math.max(Math.abs(g.window.min), Math.abs(g.window.max));
  const throughZero = g.window.min <= 0 && g.window.max >= 0;
  const yHi = s.yDb(dbOf(hi));
  const yLo = throughZero || lo === 0 ? TOP + MAG_HEIGHT : s.yDb(dbOf(lo));
  parts.push(
    `<rect x="${LEFT}" y="${fix(yHi)}" width="${fix(plotRight - LEFT)}" height="${fix(Math.max(0.5, yLo - yHi))}" class="mark window" data-min="${g.window.min}" data-max="${g.window.max}"><title>gain window ${g.window.min} … ${g.window.max} V/V</title></rect>`,
  );
  const v = (x: number): string => String(Number(x.toPrecision(3)));
  parts.push(`<text x="${fix(plotRight - 4)}" y="${fix(Math.min(yLo + 12, TOP + MAG_HEIGHT - 4))}" class="label window-label" text-anchor="end">gain window ${xmlEscape(`${v(g.window.min)} … ${v(g.window.max)} V/V`)}</text>`);
  // Band edges and −3 dB corners.
  const vline = (f: number, cls: string, label: string, row: number): void => {
    if (!(f >= s.fMin && f <= s.fMax)) return;
    const xf = fix(s.x(f));
    parts.push(`<line x1="${xf}" y1="${TOP}" x2="${xf}" y2="${phaseTop + PHASE_HEIGHT}" class="mark ${cls}" data-frequency="${f}"/>`);
    parts.push(`<text x="${fix(s.x(f) + 3)}" y="${TOP + 12 + row * 12}" class="label ${cls}-label">${xmlEscape(label)}</text>`);
  };
  if (r.band) {
    vline(r.band.low, "band-edge", `band ${hz(r.band.low)}`, 0);
    vline(r.band.high, "band-edge", `band ${hz(r.band.high)}`, 0);
  }
  if (r.lowCorner !== null) vline(r.lowCorner, "corner", `−3 dB ${hz(r.lowCorner)}`, 1);
  if (r.highCorner !== null) vline(r.highCorner, "corner", `−3 dB ${hz(r.highCorner)}`, 1);
  if (r.reference !== null && r.reference > 0) {
    const y = fix(s.yDb(dbOf(r.reference) - 10 * Math.log10(2)));
    parts.push(`<line x1="${LEFT}" y1="${y}" x2="${fix(plotRight)}" y2="${y}" class="mark level-3db"/>`);
  }
  // The traces last, on top.
  parts.push(`<path d="${trace(r.points, s.x, s.yDb, (p) => p.db)}" class="trace magnitude"/>`);
  parts.push(`<path d="${trace(r.points, s.x, s.yPhase, (p) => p.phaseDeg)}" class="trace phase"/>`);
  return { svg: `<g transform="translate(0 ${top})" class="chart" data-gain="${name}">${parts.join("")}</g>`, height: s.height };
}

const STYLE =
  ".title{font:600 13px sans-serif;fill:#222}.tick,.label{font:11px sans-serif;fill:#444}.frame{fill:#fff;stroke:#888}" +
  ".grid{stroke:#e3e3e3}.trace{fill:none;stroke-width:2}.magnitude{stroke:#1f5fbf}.phase{stroke:#b0521f}" +
  ".window{fill:#2e9d4a;fill-opacity:.15;stroke:#2e9d4a;stroke-dasharray:4 3}.band-edge{stroke:#6a3fb5;stroke-dasharray:6 4}" +
  ".corner{stroke:#c0392b}.level-3db{stroke:#c0392b;stroke-dasharray:2 3}";

/** Every gain of one circuit, stacked; null when the circuit has no gains. */
export function renderCircuitSvg(c: CircuitResult): string | null {
  if (c.gains.length === 0) return null;
  let top = 0;
  const charts: string[] = [];
  for (const g of c.gains) {
    const chart = gainChart(g, top);
    charts.push(chart.svg);
    top += chart.height + 10;
  }
  const title = xmlEscape(`${c.name ?? c.file}: frequency response of each gain`);
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${CHART_WIDTH}" height="${top}" viewBox="0 0 ${CHART_WIDTH} ${top}" role="img" class="opgate-chart">` +
    `<title>${title}</title><style>${STYLE}</style>${charts.join("")}</svg>\n`
  );
}

/** A file name for a circuit's chart from its (unique) display path: letters, digits, `.`, `_`, `-` only. */
export function chartFileName(file: string): string {
  const stem = file.replace(/\.(ya?ml|json)$/i, "").replace(/[^A-Za-z0-9._-]+/g, "--").replace(/^[.-]+/, "");
  return `${stem || "circuit"}.svg`;
}
