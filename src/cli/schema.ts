// `opgate schema`: prints a JSON Schema so editors can validate circuit files as they are typed.
import { readFileSync } from "node:fs";
import { schemaPath } from "../paths.js";
import type { CommandSpec } from "./main.js";

const SCHEMAS = ["circuit", "config", "results"] as const;

export const schemaCommand: CommandSpec = {
  command: "schema [which]",
  describe: "Print the JSON Schema of circuit files (or of the config or results document)",
  builder: (y) =>
    y
      .positional("which", { choices: SCHEMAS, default: "circuit", describe: "Which schema to print" })
      .example("$0 schema > circuit.schema.json", "Save the circuit schema for your editor")
      .example("$0 schema config", "Print the repository config schema"),
  handler: async (args, io) => {
    const which = String(args.which ?? "circuit");
    io.stdout(readFileSync(schemaPath(which), "utf8"));
    return 0;
  },
};
