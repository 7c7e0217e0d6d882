// The markdown report's Mermaid frequency-response chart: every plotted value lies on the y-axis it
// declares, the gain window included. (A window below the response used to be drawn off the chart:
// a mirror-loaded pair at 57.6 dB with a 37.5…47 dB window got an axis of 50…70 dB.)
import { describe, expect, it } from "vitest";
import type { GainEntry } from "../../src/report/document.js";
import { mermaidCharts } from "../../src/report/explain-md.js";

function gain(db: number, window: { min: number; max: number }): GainEntry {
  const points = [1, 10, 100, 1000].map((frequency) => ({ frequency, db, phaseDeg: 0 }));
  return { window, response: { points, band: null, lowCorner: null, highCorner: null } } as unknown as GainEntry;
}

function axisAndLines(g: GainEntry): { bottom: number; top: number; lines: number[][] } {
  const source = (mermaidCharts(g)[0] as { value: string }).value;
  const axis = /y-axis "dB" (-?[0-9.]+) --> (-?[0-9.]+)/.exec(source)!;
  const lines = [...source.matchAll(/line \[([^\]]*)\]/g)].map((m) => m[1]!.split(", ").map(Number));
  return { bottom: Number(axis[1]), top: Number(axis[2]), lines };
}

describe("Mermaid magnitude chart", () => {
  it.each([
    ["window below the response", 57.6, { min: 75, max: 225 }],
    ["window above the response", 10, { min: 75, max: 225 }],
    ["inverting window around the response", 22, { min: -15, max: -10 }],
  ])("%s: the response and both window edges lie on the axis", (_name, db, window) => {
    const { bottom, top, lines } = axisAndLines(gain(db, window));
    expect(lines).toHaveLength(3);
    for (const line of lines) for (const v of line) expect(v >= bottom && v <= top, `${v} outside ${bottom}…${top}`).toBe(true);
    // The window edges are drawn where 20·log10 puts them (common practice: dB of a voltage ratio).
    const edges = lines.slice(1).map((l) => l[0]);
    expect(edges).toEqual([Math.round(20 * Math.log10(Math.max(Math.abs(window.min), Math.abs(window.max))) * 10) / 10, Math.round(20 * Math.log10(Math.min(Math.abs(window.min), Math.abs(window.max))) * 10) / 10]);
  });
});
