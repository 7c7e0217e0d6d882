// The circuit schema is the single source of truth for format v1: it must compile as draft
// 2020-12, agree with the loader's kinds and pins, document every property, and accept the examples.
import { Ajv2020 } from "ajv/dist/2020.js";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { parse } from "yaml";
import { describe, expect, it } from "vitest";
import { loadCircuitFile, loadCircuitSchema } from "../../src/circuit/index.js";
import { PIN_TEXT } from "../../src/circuit/messages.js";

type Json = Record<string, unknown>;
const schema = loadCircuitSchema() as Json;
const defs = schema["$defs"] as Record<string, Json>;

describe("schemas/circuit.schema.json", () => {
  it("compiles as JSON Schema draft 2020-12 in ajv's strict mode", () => {
    expect(schema["$schema"]).toBe("https://json-schema.org/draft/2020-12/schema");
    const ajv = new Ajv2020({ strict: true, allowUnionTypes: true });
    expect(() => ajv.compile(schema)).not.toThrow();
  });

  it("lists the component kinds of DESIGN.md section 3 with their exact pins", () => {
    const kinds = ((defs["component"]!["properties"] as Json)["kind"] as { enum: string[] }).enum;
    expect([...kinds].sort()).toEqual(Object.keys(PIN_TEXT).sort());
    for (const kind of kinds) {
      const pins = (defs[`component-${kind}`]!["properties"] as Json)["pins"] as Json;
      const names = pins["type"] === "array" ? ["a", "b"] : Object.keys(pins["properties"] as Json);
      const required = pins["type"] === "array" ? ["a", "b"] : (pins["required"] as string[]);
      const expected = PIN_TEXT[kind]!.replace(/[[\]{}\s]/g, "").split(",");
      expect(names).toEqual(expected.map((p) => p.replace("?", "")));
      expect(required).toEqual(expected.filter((p) => !p.endsWith("?")));
    }
  });

  it("has the model parameters of every model kind", () => {
    const props = (k: string) => Object.keys(defs[`model-${k}`]!["properties"] as Json).sort();
    const base = ["description", "kind", "powerRating", "ratings"];
    expect(props("diode")).toEqual([...base, "saturationCurrent", "forward", "breakdown", "ideality", "seriesResistance", "forwardVoltageDrift", "driftCurrent"].sort());
    const bjt = [...base, "beta", "reverseBeta", "saturationCurrent", "earlyVoltage", "saturationEdge", "baseEmitterDrift", "driftCurrent", "betaDrift", "betaAt", "transitFrequency", "baseCollectorCapacitance"].sort();
    expect(props("npn")).toEqual(bjt);
    expect(props("pnp")).toEqual(bjt);
    const mos = [...base, "threshold", "kPrime", "width", "length", "channelLengthModulation", "bodyEffect", "fermiPotential", "thresholdTempco", "kPrimeExponent", "gateSourceCapacitance", "gateDrainCapacitance", "oxideCapacitance"].sort();
    expect(props("nmos")).toEqual(mos);
    expect(props("pmos")).toEqual(mos);
  });

  it("documents every property (editors show the description as help)", () => {
    const missing: string[] = [];
    const walk = (node: unknown, where: string): void => {
      if (node === null || typeof node !== "object") return;
      const o = node as Json;
      if (o["properties"]) {
        for (const [k, v] of Object.entries(o["properties"] as Json)) {
          const p = v as Json;
          const ref = typeof p["$ref"] === "string" ? defs[(p["$ref"] as string).split("/").pop()!] : undefined;
          if (!p["description"] && !ref?.["description"] && k !== "kind") missing.push(`${where}.${k}`);
        }
      }
      for (const [k, v] of Object.entries(o)) walk(v, `${where}/${k}`);
    };
    walk(schema, "#");
    expect(missing).toEqual([]);
  });

  it("bounds untrusted sizes: lists, maps and strings", () => {
    expect((schema["properties"] as Json)["components"]).toMatchObject({ maxItems: expect.any(Number) });
    expect((schema["properties"] as Json)["parameters"]).toMatchObject({ maxProperties: expect.any(Number) });
    expect(defs["value"]).toMatchObject({ maxLength: expect.any(Number) });
  });

  it("accepts every example that the loader accepts (plain ajv, no opgate code)", async () => {
    const dir = fileURLToPath(new URL("../../examples/", import.meta.url));
    const validate = new Ajv2020({ allErrors: true, allowUnionTypes: true }).compile(schema);
    for (const f of readdirSync(dir).filter((x) => x.endsWith(".yaml"))) {
      const ok = validate(parse(readFileSync(join(dir, f), "utf8")));
      const loaded = await loadCircuitFile(join(dir, f));
      if (loaded.ok) expect(ok, f).toBe(true);
    }
  });
});

describe("loadCircuitFile", () => {
  it("names the display path for a missing file, a folder and an unknown extension", async () => {
    expect(await loadCircuitFile("/nonexistent/amp.yaml", { displayPath: "boards/amp.yaml" })).toEqual({ ok: false, errors: [{ file: "boards/amp.yaml", message: "file not found", hint: "check the path and permissions" }] });
    const folder = join(mkdtempSync(join(tmpdir(), "opgate-dir-")), "looks-like.yaml");
    mkdirSync(folder);
    expect(await loadCircuitFile(folder, { displayPath: "looks-like.yaml" })).toMatchObject({ ok: false, errors: [{ file: "looks-like.yaml", message: "not a file" }] });
    expect(await loadCircuitFile("amp.cir")).toMatchObject({ ok: false, errors: [{ message: "unknown file type `.cir`" }] });
  });
});
