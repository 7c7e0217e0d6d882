// Model libraries: one library used by two circuits, errors inside the library at the library's
// file:line:column, a circuit's own model overriding a library model with a warning, paths kept
// inside the repository, and the SHA-256 of the library recorded with each use.
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadCircuitFile } from "../../src/circuit/index.js";
import type { BjtModel, LoadResult } from "../../src/circuit/types.js";
import { documentProblems } from "../../src/report/validate.js";
import { cli } from "../run/repo.js";

const LIBRARY = `format: opgate-library/1
description: Tidewater Instruments approved parts
models:
  tw-npn:
    kind: npn
    beta: { min: 150, typ: 250, max: 400 }
    saturationCurrent: 1e-14 A
    earlyVoltage: 100 V
    ratings: { collectorEmitter: 40 V, collectorCurrent: 200 mA }
  ref-5v1: { kind: diode, saturationCurrent: 1 nA, breakdown: { voltage: 5.1 V, current: 5 mA, resistance: 10 Ω } }
`;
const follower = (name: string, extra = "") => `format: opgate-circuit/1
name: ${name}
${extra}components:
  - { id: VCC, kind: voltage-source, pins: { plus: vcc, minus: gnd }, voltage: 12 V }
  - { id: RZ, kind: resistor, pins: [vcc, z], value: 1k, powerRating: 0.25 W }
  - { id: D1, kind: diode, model: ref-5v1, pins: { anode: gnd, cathode: z } }
  - { id: Q1, kind: npn, model: tw-npn, pins: { collector: vcc, base: z, emitter: out } }
  - { id: RE, kind: resistor, pins: [out, gnd], value: 1k }
`;
const CONFIG = "libraries: [lib/parts.yaml]\n";

let dir: string;
const write = (rel: string, text: string) => {
  mkdirSync(dirname(join(dir, rel)), { recursive: true });
  writeFileSync(join(dir, rel), text);
};
const lib = (rel = "lib/parts.yaml") => ({ path: join(dir, rel), shown: rel });
const load = (rel: string, libraries = [lib()]) => loadCircuitFile(join(dir, rel), { displayPath: rel, root: dir, libraries });
const ok = (r: LoadResult) => {
  if (!r.ok) throw new Error(r.errors.map((e) => `${e.file}:${e.line}:${e.column} ${e.message}`).join("\n"));
  return r.circuit;
};

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "opgate-lib-"));
  write("lib/parts.yaml", LIBRARY);
  write("opgate.config.yaml", CONFIG);
  write("boards/a.yaml", follower("follower-a"));
  write("boards/b.yaml", follower("follower-b"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("a library model used by two circuits", () => {
  it("both resolve the same model, placed at the library's line, with the library's digest", async () => {
    const digest = createHash("sha256").update(readFileSync(join(dir, "lib/parts.yaml"))).digest("hex");
    const a = ok(await load("boards/a.yaml"));
    const b = ok(await load("boards/b.yaml"));
    for (const c of [a, b]) {
      const q = c.models.get("tw-npn") as BjtModel;
      expect(q.beta.typ).toBe(250);
      expect(q.ratings?.collectorEmitter).toBe(40);
      expect(q.pos).toMatchObject({ file: "lib/parts.yaml", line: 4 });
      expect(c.libraries).toEqual([{ file: "lib/parts.yaml", sha256: digest }]);
      expect(c.warnings).toEqual([]);
    }
  });

  it("`opgate check` records the library and its SHA-256 for every circuit that used it", async () => {
    const r = await cli(["check", "boards", "--jobs", "1", "--json", "out/r.json"], dir);
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(join(dir, "out/r.json"), "utf8"));
    expect(documentProblems(doc)).toEqual([]);
    const digest = createHash("sha256").update(readFileSync(join(dir, "lib/parts.yaml"))).digest("hex");
    expect(doc.circuits.map((c: { libraries: unknown }) => c.libraries)).toEqual([
      [{ file: "lib/parts.yaml", sha256: digest }],
      [{ file: "lib/parts.yaml", sha256: digest }],
    ]);
    // The library itself is not a circuit: discovery passes over it without calling it a stray file.
    expect(doc.circuits).toHaveLength(2);
    expect(r.stderr).not.toContain("skipped");
  });

  it("a circuit may name a library itself, relative to its own file", async () => {
    write("boards/own.yaml", follower("follower-own", "libraries: [../lib/parts.yaml]\n"));
    const c = ok(await load("boards/own.yaml", []));
    expect(c.libraries?.map((l) => l.file)).toEqual(["lib/parts.yaml"]);
  });

  it("a changed library gives a new digest", async () => {
    write("lib/other.yaml", LIBRARY.replace("typ: 250", "typ: 260"));
    const c = ok(await load("boards/a.yaml", [lib("lib/other.yaml")]));
    expect((c.models.get("tw-npn") as BjtModel).beta.typ).toBe(260);
    expect(c.libraries![0]!.sha256).not.toBe(createHash("sha256").update(LIBRARY).digest("hex"));
  });
});

describe("errors and warnings", () => {
  it("an error inside the library is reported at the library's file:line:column", async () => {
    write("lib/broken.yaml", LIBRARY.replace("earlyVoltage: 100 V", "earlyVoltage: 100 uF"));
    const r = await load("boards/a.yaml", [lib("lib/broken.yaml")]);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ file: "lib/broken.yaml", line: 8, column: 19 });
    expect(r.libraries?.[0]?.file).toBe("lib/broken.yaml");
  });

  it("a schema error inside the library too (a typo in a key)", async () => {
    write("lib/typo.yaml", LIBRARY.replace("saturationCurrent: 1e-14 A", "saturationCurent: 1e-14 A"));
    const r = await load("boards/a.yaml", [lib("lib/typo.yaml")]);
    if (r.ok) throw new Error("expected errors");
    expect(r.errors[0]).toMatchObject({ file: "lib/typo.yaml", line: 7 });
  });

  it("`opgate check` reports the library error at the library for each circuit, status error", async () => {
    write("lib2/opgate.config.yaml", "libraries: [parts.yaml]\n");
    write("lib2/parts.yaml", LIBRARY.replace("earlyVoltage: 100 V", "earlyVoltage: 100 uF"));
    write("lib2/boards/a.yaml", follower("follower-a"));
    const r = await cli(["check", "boards", "--jobs", "1", "--json", "out.json"], join(dir, "lib2"));
    expect(r.code).toBe(2);
    const doc = JSON.parse(readFileSync(join(dir, "lib2/out.json"), "utf8"));
    expect(doc.circuits[0].status).toBe("error");
    expect(doc.circuits[0].findings[0]).toMatchObject({ rule: "input", file: "parts.yaml", line: 8 });
    expect(doc.circuits[0].libraries[0].file).toBe("parts.yaml");
  });

  it("a circuit's own model overriding a library model by id is a warning at the circuit's model", async () => {
    write("boards/override.yaml", follower("follower-override", "models:\n  tw-npn: { kind: npn, beta: 100, saturationCurrent: 2e-14 A }\n"));
    const c = ok(await load("boards/override.yaml"));
    expect((c.models.get("tw-npn") as BjtModel).beta.typ).toBe(100);
    expect(c.warnings).toHaveLength(1);
    expect(c.warnings[0]).toMatchObject({ file: "boards/override.yaml", line: 4, message: expect.stringContaining("overrides the library model of the same id (lib/parts.yaml:4)") });
  });

  it("a library path may not leave the repository or be absolute", async () => {
    for (const bad of ["../../etc/passwd.yaml", "/etc/parts.yaml"]) {
      write("boards/escape.yaml", follower("escape", `libraries: [${JSON.stringify(bad)}]\n`));
      const r = await load("boards/escape.yaml", []);
      if (r.ok) throw new Error("expected errors");
      expect(r.errors[0]).toMatchObject({ file: "boards/escape.yaml", line: 3 });
    }
  });

  it("a missing library is an error naming it", async () => {
    const r = await load("boards/a.yaml", [lib("lib/missing.yaml")]);
    if (r.ok) throw new Error("expected errors");
    expect(r.errors[0]!.message).toContain("lib/missing.yaml` not found");
  });

  it("the config refuses a library file that does not exist, at its line", async () => {
    write("cfg/opgate.config.yaml", "include: ['*.yaml']\nlibraries:\n  - nowhere.yaml\n");
    const r = await cli(["check", "--json", "o.json"], join(dir, "cfg"));
    expect(r.code).toBe(2);
    expect(r.stderr + r.stdout).toMatch(/opgate\.config\.yaml:3:\d+.*nowhere\.yaml/);
  });
});
