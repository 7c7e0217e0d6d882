// `opgate inspect FILE`: load one circuit, solve its DC operating point and print it as tables.
// Sections are a list of renderers so later stages (small-signal) can add theirs.
import { relative, resolve } from "node:path";
import { loadCircuitFile } from "../circuit/index.js";
import type { Circuit } from "../circuit/types.js";
import { solveOperatingPoint } from "../solve/index.js";
import { renderOperatingPoint } from "../solve/table.js";
import type { OperatingPoint } from "../solve/types.js";
import { formatInputError } from "./check.js";
import { EXIT_CLEAN, EXIT_INPUT, type CliIo } from "./io.js";
import type { CommandSpec } from "./main.js";

/** One block of `inspect` output, drawn from the circuit and its solved operating point. */
export type InspectSection = (circuit: Circuit, op: OperatingPoint) => string;

/** Printed in order after the header; append to add a section. */
export const INSPECT_SECTIONS: InspectSection[] = [(_c, op) => renderOperatingPoint(op)];

/** Exit code when the circuit loads but has no DC operating point (an input problem to fix). */
export const EXIT_UNSOLVABLE = EXIT_INPUT;

export const inspectCommand: CommandSpec = {
  command: "inspect <file>",
  describe: "Solve one circuit file and print its DC operating point (node voltages, device bias)",
  builder: (y) =>
    y
      .positional("file", { type: "string", describe: "Circuit file (.yaml, .yml or .json)" })
      .example("$0 inspect boards/tide-gauge/front-end.yaml", "Print node voltages and transistor bias of one circuit")
      .example("$0 inspect wind-vane.json | less -S", "Page through a wide table"),
  handler: async (args, io: CliIo) => {
    const file = String(args.file);
    const abs = resolve(io.cwd, file);
    const shown = relative(io.cwd, abs) || file;
    const loaded = await loadCircuitFile(abs, { displayPath: shown });
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
    return EXIT_CLEAN;
  },
};
