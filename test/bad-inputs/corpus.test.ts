// The bad-input corpus, checked through the real CLI (in-process, plus one spawned process):
// every file must end with exit code 2, a message naming the file (and line:column where there
// is one), the expected key phrase, and never a stack trace.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import type { CliIo } from "../../src/cli/io.js";
import { run } from "../../src/cli/main.js";

const HERE = fileURLToPath(new URL(".", import.meta.url));
const ROOT = join(HERE, "..", "..");

/** file → [key phrase (regex), has a line:column]. */
const CORPUS: Record<string, [RegExp, boolean]> = {
  "invalid-yaml.yaml": [/invalid YAML/, true],
  "trailing-comma.json": [/invalid JSON: a comma after the last item/, true],
  "trailing-comma-object.json": [/invalid JSON: a comma after the last item/, true],
  "unknown-kind.yaml": [/unknown kind `resistr`.*did you mean `resistor`/, true],
  "typo-key.yaml": [/unknown key `vaule` in component R3.*did you mean `value`/, true],
  "wrong-pins.yaml": [/component V1 of kind voltage-source needs pins \{plus, minus\}/, true],
  "too-few-pins.yaml": [/component R1 of kind resistor needs pins \[a, b\]/, true],
  "duplicate-id.yaml": [/duplicate component id `R1`/, true],
  "duplicate-key.yaml": [/duplicate key/, true],
  "tolerance-five.yaml": [/tolerance 5 is more than 1.*write "5%"/, true],
  "farad-on-resistor.yaml": [/`10 uF` is a capacitance, but this field is a resistance.*Ω/, true],
  "meg-prefix.yaml": [/`meg` is not an SI prefix.*write M for mega/, true],
  "proto-key.yaml": [/key `__proto__` is not allowed/, true],
  "constructor-key.yaml": [/key `constructor` is not allowed/, true],
  "expr-import.yaml": [/calling `import\(…\)` is not allowed/, true],
  "expr-evaluate.yaml": [/calling `evaluate\(…\)` is not allowed/, true],
  "expr-createunit.yaml": [/calling `createUnit\(…\)` is not allowed/, true],
  "expr-accessor.yaml": [/property or index access is not allowed/, true],
  "expr-function-definition.yaml": [/function definitions are not allowed/, true],
  "alias-bomb.yaml": [/too many YAML alias expansions/, false],
  "floating-node.yaml": [/nodes `mid`, `top` have no DC path to ground.*capacitor C1, capacitor C2/, true],
  "voltage-source-loop.yaml": [/loop of voltage sources and DC shorts: V1 → V2 → V1/, true],
  "inductor-loop.yaml": [/loop of voltage sources and DC shorts: V1 → L1 → V1/, true],
  "current-source-only.yaml": [/node `x` is fed only by current sources \(I1\)/, true],
  "empty.yaml": [/file is empty/, true],
  "unknown-model.yaml": [/unknown model `smal-npn`.*did you mean `small-npn`/, true],
  "wrong-model-kind.yaml": [/Q1 is an npn but model `small-pnp` is of kind pnp/, true],
  "spec-missing-node.yaml": [/output node `outt` does not exist.*did you mean `out`/, true],
  "spec-input-not-source.yaml": [/input `R1` is a resistor, not an independent source/, true],
  "cyclic-parameters.yaml": [/parameters form a cycle: a → b → c → a/, true],
  "unknown-parameter.yaml": [/unknown parameter `rLaod`/, true],
  "wrong-format.yaml": [/`format` must be `opgate-circuit\/1`/, true],
  "sense-not-two-terminal.yaml": [/sense `D1` is a diode; a controlled source senses the current of a resistor, capacitor, inductor, voltage-source or current-source/, true],
  "spread-out-of-order.yaml": [/range \{min: 300, typ: 200, max: 400\} is out of order/, true],
  "ground-unconnected.yaml": [/no component connects to the ground node `gnd`.*ground: 0/, true],
  "not-a-mapping.yaml": [/must be a mapping/, true],
  "unknown-tag.yaml": [/unknown YAML tag/, true],
  "multiple-documents.yaml": [/more than one YAML document/, true],
  "tab-indent.yaml": [/a tab is used for indentation/, true],
  // The format's vocabulary changed in place: an old key is refused and the hint names its replacement.
  "old-key-dc.yaml": [/unknown key `dc` in component V1.*`dc` is now `voltage`/, true],
  "old-key-dc-current.yaml": [/unknown key `dc` in component I1.*`dc` is now `current`/, true],
  "old-key-ac.yaml": [/unknown key `ac` in component V1.*`ac` is now `signal`/, true],
  "old-key-lambda.yaml": [/unknown key `lambda` in model n1.*`lambda` is now `channelLengthModulation`/, true],
  "old-key-control.yaml": [/unknown key `control` in component F1.*`control` is now `sense`/, true],
  // Issue 12 items 10 and 15: text that was read as something other than what it says.
  "yaml-1-1-directive.yaml": [/yaml-1-1-directive\.yaml:1:1 .*the `%YAML 1\.1` directive is not allowed: circuit files are read as YAML 1\.2/, true],
  "nul-in-comment.yaml": [/nul-in-comment\.yaml:3:\d+ .*the file contains a NUL character/, true],
  "invalid-utf8-with-fffd.yaml": [/invalid-utf8-with-fffd\.yaml:4:1 .*the file is not valid UTF-8 text/, true],
  "cr-only-line-endings.yaml": [/cr-only-line-endings\.yaml:5:\d+ .*unknown key `vaule` in component R1/, true],
  "proto-name.yaml": [/proto-name\.yaml:5:\d+ .*the name `__proto__` is not allowed/, true],
  // Issue 12 items 11 and 13.
  "parameter-shadows-constant.yaml": [/parameter-shadows-constant\.yaml:4:\d+ .*parameter `e` has the name of a constant of expressions/, true],
  "tolerance-over-100-percent.yaml": [/tolerance 300% is more than 100 %/, true],
  "tolerance-reaches-zero.yaml": [/tolerance 100% takes value down to zero/, true],
  // Issue 12 item 14: values out of physical range, refused with the parameter named.
  "model-reverse-beta-zero.yaml": [/model small-npn: reverseBeta must be positive/, true],
  "model-power-rating-negative.yaml": [/model small-npn: powerRating must be a positive power/, true],
  "model-diode-saturation-negative.yaml": [/model d1: saturationCurrent must be positive/, true],
  "model-diode-ideality-zero.yaml": [/model d1: ideality must be positive/, true],
  "model-channel-length-modulation-negative.yaml": [/model n1: channelLengthModulation must be zero or positive/, true],
  "resistor-power-rating-negative.yaml": [/component R1: powerRating must be a positive power/, true],
  "temperature-beyond-models.yaml": [/`temperature` 1\.000e\+6 °C is beyond what the device models hold/, true],
  "signal-negative.yaml": [/component V1: the signal amplitude must be positive/, true],
};

function fakeIo(cwd: string): CliIo & { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  return { cwd, env: {}, isTTY: false, out, err, stdout: (t) => void out.push(t), stderr: (t) => void err.push(t) };
}

async function check(file: string, cwd = ROOT): Promise<{ code: number; text: string }> {
  const io = fakeIo(cwd);
  const code = await run(["check", file], io);
  return { code, text: [...io.out, ...io.err].join("") };
}

function expectCleanError(text: string, shown: string, phrase: RegExp, hasLine: boolean): void {
  expect(text).toContain(shown);
  if (hasLine) expect(text).toMatch(new RegExp(`${shown.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}:\\d+:\\d+`));
  expect(text.replace(/\s+/g, " ")).toMatch(phrase);
  expect(text).not.toMatch(/^\s+at /m);
  expect(text).not.toMatch(/internal error/);
}

describe("bad-input corpus through `opgate check`", () => {
  it("has at least 20 files, and every file in the folder is in the table", () => {
    const files = readdirSync(HERE).filter((f) => /\.(ya?ml|json)$/.test(f));
    expect(files.length).toBeGreaterThanOrEqual(20);
    expect(files.sort()).toEqual(Object.keys(CORPUS).sort());
  });

  it.each(Object.entries(CORPUS))("%s", async (name, [phrase, hasLine]) => {
    const shown = relative(ROOT, join(HERE, name));
    const { code, text } = await check(shown);
    expect(code).toBe(2);
    expectCleanError(text, shown, phrase, hasLine);
  });

  it("a huge file (over 1 MiB) is refused by size", async () => {
    const dir = mkdtempSync(join(tmpdir(), "opgate-huge-"));
    const file = join(dir, "huge.yaml");
    const filler = `# ${"x".repeat(98)}\n`.repeat(11_000);
    writeFileSync(file, `format: opgate-circuit/1\nname: huge\n${filler}components: []\n`);
    const { code, text } = await check("huge.yaml", dir);
    expect(code).toBe(2);
    expectCleanError(text, "huge.yaml", /file is too large \(\d+ bytes; the limit is 1048576 bytes\)/, false);
  });

  it("absurd nesting is refused without a crash", async () => {
    const dir = mkdtempSync(join(tmpdir(), "opgate-deep-"));
    writeFileSync(join(dir, "deep.yaml"), `format: opgate-circuit/1\nname: deep\ncomponents: ${"[".repeat(200_000)}${"]".repeat(200_000)}\n`);
    const { code, text } = await check("deep.yaml", dir);
    expect(code).toBe(2);
    expectCleanError(text, "deep.yaml", /nested too deeply/, true);
  });

  it("a file of another type named explicitly is refused", async () => {
    const dir = mkdtempSync(join(tmpdir(), "opgate-ext-"));
    writeFileSync(join(dir, "amp.txt"), "format: opgate-circuit/1\n");
    const { code, text } = await check("amp.txt", dir);
    expect(code).toBe(2);
    expectCleanError(text, "amp.txt", /unknown file type `\.txt`/, false);
  });

  it("one broken file does not stop the others", async () => {
    const io = fakeIo(ROOT);
    const code = await run(["check", "test/bad-inputs/typo-key.yaml", "examples/tide-gauge-preamp.yaml"], io);
    expect(code).toBe(2);
    const text = io.out.join("");
    expect(text).toMatch(/typo-key\.yaml:5:49/);
    expect(text).toMatch(/tide-gauge-preamp\.yaml/);
  });

  it("the real process: node --import tsx src/cli/bin.ts check <file>", () => {
    const r = spawnSync(process.execPath, ["--import", "tsx", "src/cli/bin.ts", "check", "test/bad-inputs/typo-key.yaml"], { cwd: ROOT, encoding: "utf8", env: { ...process.env, NO_COLOR: "1" } });
    expect(r.status).toBe(2);
    expectCleanError(r.stdout + r.stderr, "test/bad-inputs/typo-key.yaml", /unknown key `vaule` in component R3/, true);
  });
});
