// Bad input aimed at the sinks rather than the parser: circuit files whose names and contents carry
// terminal escapes (ESC, BEL), line breaks followed by `::` (an Actions workflow command), bidi
// overrides, markdown and HTML, checked through the real CLI under GitHub Actions with every report
// written. Each sink must keep the text inert: the console and annotations (what the runner reads),
// the markdown report and step summary, JUnit XML and SARIF.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fromMarkdown } from "mdast-util-from-markdown";
import { gfmFromMarkdown } from "mdast-util-gfm";
import { gfm } from "micromark-extension-gfm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cli } from "../run/repo.js";

const ESC = "\u001b";
const BEL = "\u0007";
/** A file name (Linux allows every byte but `/` and NUL) that ends a log line and starts a command. */
const HOSTILE_NAME = `evil\n::error file=x::injected ${ESC}[31m${BEL}\u202e.yaml`;
/** A circuit whose key carries escapes (the "unknown key" message quotes it), and a broken one. */
const HOSTILE_KEY = `format: opgate-circuit/1
name: hostile
components:
  - { id: V1, kind: voltage-source, pins: { plus: a, minus: gnd }, voltage: 5 V }
  - { id: R1, kind: resistor, pins: [a, gnd], value: 1k, "va${ESC}]0;pwned${BEL}\`lue|![x](https://e.example/i.png) @octocat": 1 }
`;

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "opgate-hostile-"));
  mkdirSync(join(dir, "boards"));
  writeFileSync(join(dir, "boards", HOSTILE_NAME), "format: opgate-circuit/1\nname: [\n");
  writeFileSync(join(dir, "boards", "hostile-key.yaml"), HOSTILE_KEY);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const CONTROL = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202e]/;

describe("hostile text from circuit files, in every sink", () => {
  it("stays inert in the console, annotations, step summary, markdown, JUnit and SARIF", async () => {
    const summary = join(dir, "summary.md");
    writeFileSync(summary, "");
    const r = await cli(["check", "boards", "--jobs", "1", "--json", "out/r.json", "--junit", "out/j.xml", "--markdown", "out/r.md", "--sarif", "out/s.sarif"], dir, {
      CI: "true",
      GITHUB_ACTIONS: "true",
      GITHUB_STEP_SUMMARY: summary,
    });
    expect(r.code).toBe(2);
    // What the runner reads: every line that starts a workflow command is one of ours, whole.
    const log = `${r.stdout}${r.stderr}`;
    expect(log).not.toMatch(CONTROL);
    const commands = log.split("\n").filter((l) => /^\s*::/.test(l));
    expect(commands.length).toBeGreaterThan(0);
    for (const c of commands) expect(c).toMatch(/^::(error|warning|notice) file=[^:]*,line=\d+,col=\d+,title=[^:]*::/);
    expect(commands.join("\n")).not.toMatch(/^::error file=x::/m);
    // The two files were both reported, each with its own input error.
    expect(r.stdout).toContain("evil\\n::error file=x::injected \\e[31m\\x07\\u202e.yaml");
    expect(r.stdout).toContain("va\\e]0;pwned\\x07");

    for (const file of ["out/r.md", "summary.md"]) {
      const md = readFileSync(join(dir, file), "utf8");
      expect(md, file).not.toMatch(CONTROL);
      const tree = fromMarkdown(md, { extensions: [gfm()], mdastExtensions: [gfmFromMarkdown()] });
      const types = new Set<string>();
      const walk = (n: { type: string; children?: unknown[] }): void => {
        types.add(n.type);
        for (const c of n.children ?? []) walk(c as { type: string; children?: unknown[] });
      };
      walk(tree);
      expect(types.has("link") || types.has("image"), file).toBe(false);
    }
    const junit = readFileSync(join(dir, "out/j.xml"), "utf8");
    expect(junit).not.toMatch(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f\u202e]/);
    const sarif = readFileSync(join(dir, "out/s.sarif"), "utf8");
    // JSON escapes would hide raw controls: check the decoded strings.
    const strings: string[] = [];
    JSON.parse(sarif, (_k, v: unknown) => {
      if (typeof v === "string") strings.push(v);
      return v;
    });
    for (const s of strings) expect(s).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f\u202e]/);
    // The results document keeps the facts as they are (it is data, not a display).
    expect(readFileSync(join(dir, "out/r.json"), "utf8")).toContain("\\n::error file=x::injected");
  });
});
