// `opgate inspect FILE`: load one circuit, solve its DC operating point and print it as tables.
// Sections are a list of renderers so later stages (small-signal) can add theirs.
import { relative, resolve } from "node:path";
import { loadCircuitFile } from "../circuit/index.js";
import type { Circuit } from "../circuit/types.js";
import { solveOperatingPoint } from "../solve/index.js";
import { renderOperatingPoint } from "../solve/table.js";
import type { OperatingPoint } from "../solve/types.js";
import { analyseSmallSignal, defaultSweepRange, sweepGain, type SweepOptions } from "../smallsignal/index.js";
import { formatSi, renderSmallSignal, renderSweep, sweepCsv } from "../smallsignal/table.js";
import { swingLimits } from "../review/swing.js";
import { writeFileSync } from "node:fs";
import { explainGains } from "../smallsignal/explain/index.js";
import { jsonSafe } from "../pipeline/gain-extras.js";
import { renderExplanationText } from "../report/explain-text.js";
import { formatInputError } from "./check.js";
import { loadConfig } from "../review/config.js";
import { EXIT_CLEAN, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";

/** One block of `inspect` output, drawn from the circuit and its solved operating point. */
export type InspectSection = (circuit: Circuit, op: OperatingPoint) => string;

/** Printed in order after the header; append to add a section. */
export const INSPECT_SECTIONS: InspectSection[] = [
  (_c, op) => renderOperatingPoint(op),
  (c, op) => renderSmallSignal(c, op, analyseSmallSignal(c, op)),
  (c, op) => renderSwing(c, op),
];

/** The largest input amplitude each gain takes before a device or the output clips (signal-swing's figures). */
function renderSwing(circuit: Circuit, op: OperatingPoint): string {
  if (circuit.specs.gains.length === 0) return "";
  const lines = ["Signal swing (largest input peak before clipping, from midband and the band edges)"];
  for (const spec of circuit.specs.gains) {
    const fit = swingLimits(circuit, op, spec);
    if (typeof fit === "string") {
      lines.push(`  ${spec.name}: not computed: ${fit}`);
      continue;
    }
    const first = fit.limits[0];
    const source = circuit.components.find((c) => c.id === spec.input);
    const stated = source && (source.kind === "voltage-source" || source.kind === "current-source") && source.signal !== undefined ? `; stated ${formatSi(source.signal, fit.inputUnit)} peak` : "";
    if (!first || !Number.isFinite(first.maxInput)) lines.push(`  ${spec.name}: no transistor or DC-coupled output moves${stated}`);
    else lines.push(`  ${spec.name}: ${formatSi(first.maxInput, fit.inputUnit)} peak (${first.subject}, ${first.side} side first)${stated}`);
  }
  return lines.join("\n") + "\n";
}

/** A sweep range from the flags, else the default around the spec band. */
function sweepRange(circuit: Circuit, args: Record<string, unknown>): SweepOptions {
  const base = defaultSweepRange(circuit);
  const num = (v: unknown): number | undefined => (typeof v === "number" && Number.isFinite(v) ? v : undefined);
  return { ...base, start: num(args.from) ?? base.start, stop: num(args.to) ?? base.stop, points: num(args.points) ?? base.points };
}

/** Exit code when the circuit loads but has no DC operating point (an input problem to fix). */
export const EXIT_UNSOLVABLE = EXIT_INPUT;

export const inspectCommand: CommandSpec = {
  command: "inspect <file>",
  describe: "Solve one circuit file and print its DC operating point (node voltages, device bias)",
  builder: (y) =>
    y
      .positional("file", { type: "string", describe: "Circuit file (.yaml, .yml or .json)" })
      .example("$0 inspect boards/tide-gauge/front-end.yaml", "Print node voltages and transistor bias of one circuit")
      .option("sweep", { type: "string", describe: "Also print the frequency response of GAIN (every gain when no name is given)" })
      .option("from", { type: "number", describe: "Sweep start frequency in Hz (default: two decades below band.low)" })
      .option("to", { type: "number", describe: "Sweep stop frequency in Hz (default: two decades above band.high)" })
      .option("points", { type: "number", describe: "Number of log-spaced sweep points" })
      .option("explain", { type: "boolean", describe: "Also print the hand-analysis chain of every gain: stages, bias, resistances seen, textbook formula vs exact" })
      .option("csv", { type: "string", describe: "Write the sweep of one gain as CSV to this path" })
      .example("$0 inspect wind-vane.json | less -S", "Page through a wide table")
      .example("$0 inspect preamp.yaml --explain", "Each gain as a hand analysis: bias → re → resistances → formula, next to the exact value")
      .example("$0 inspect preamp.yaml --sweep preamp --csv preamp.csv", "Frequency response of gain `preamp`, also as CSV"),
  handler: async (args, io: CliIo) => {
    const file = String(args.file);
    const abs = resolve(io.cwd, file);
    const shown = relative(io.cwd, abs) || file;
    // The repository's model libraries, as `check` uses them; a config that cannot be read is
    // `check`'s business, so inspect then goes on without them (and says so).
    let libraries: { path: string; shown: string }[] = [];
    let root: string | undefined;
    try {
      const config = await loadConfig({ cwd: io.cwd });
      root = config.root;
      libraries = config.libraries.map((path) => ({ path, shown: relative(io.cwd, path) || path }));
    } catch (err) {
      io.stderr(`note: the repository config could not be read, so its model libraries are not used: ${err instanceof Error ? err.message.split("\n")[0] : String(err)}\n`);
    }
    const loaded = await loadCircuitFile(abs, { displayPath: shown, libraries, ...(root !== undefined ? { root } : {}) });
    if (!loaded.ok) {
      for (const e of loaded.errors) io.stderr(`${formatInputError(e)}\n`);
      return EXIT_INPUT;
    }
    const circuit = loaded.circuit;
    const result = solveOperatingPoint(circuit);
    const header = `${circuit.name} (${shown}) at ${(circuit.temperature - 273.15).toFixed(1)} °C\n\n`;
    if (!result.ok) {
      io.stderr(`${shown}: error: no DC operating point: ${result.reason}\n`);
      if (result.parts.length) io.stderr(`  parts: ${result.parts.join(", ")}\n`);
      if (result.nodes.length) io.stderr(`  nodes: ${result.nodes.join(", ")}\n`);
      return EXIT_UNSOLVABLE;
    }
    io.stdout(header + INSPECT_SECTIONS.map((s) => s(circuit, result)).join("\n"));
    if (args.explain === true) {
      const chains = explainGains(circuit, result);
      io.stdout(`\nHand analysis\n\n${chains.length === 0 ? "no gains in specs.gains\n" : chains.map((e) => renderExplanationText(jsonSafe(e))).join("\n")}`);
    }
    if (args.sweep === undefined && args.csv === undefined) return EXIT_CLEAN;
    const asked = typeof args.sweep === "string" && args.sweep !== "" ? [args.sweep] : circuit.specs.gains.map((g) => g.name);
    if (asked.length === 0) {
      io.stderr(`${shown}: error: --sweep needs a gain, and specs.gains is empty — add a gain spec to the circuit file\n`);
      return EXIT_INPUT;
    }
    if (typeof args.csv === "string" && asked.length > 1) {
      io.stderr(`opgate: --csv writes one gain; name it: --sweep ${asked[0]} (gains: ${asked.join(", ")})\n`);
      return EXIT_INPUT;
    }
    const range = sweepRange(circuit, args);
    for (const name of asked) {
      const sweep = sweepGain(circuit, result, name, range);
      if (sweep.error) {
        io.stderr(`${shown}: error: cannot sweep gain \`${name}\`: ${sweep.error}\n`);
        return EXIT_INPUT;
      }
      io.stdout(`\n${renderSweep(sweep)}`);
      if (typeof args.csv === "string") writeFileSync(resolve(io.cwd, args.csv), sweepCsv(sweep));
    }
    return EXIT_CLEAN;
  },
};
