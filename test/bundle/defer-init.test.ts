// The bundle's build-time rewrite (src/bundle/defer-init.ts): string-width, rewritten so that its
// regular expressions and segmenter are built on first use, must measure every string exactly as
// the published module does — for each copy of string-width installed (yargs's help layout and the
// markdown tables use them). The reference is the unmodified package from the npm registry.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { deferTopLevelInit } from "../../src/bundle/defer-init.js";

const COPIES = ["node_modules/string-width/index.js", "node_modules/cliui/node_modules/string-width/index.js", "node_modules/wrap-ansi/node_modules/string-width/index.js"];

// Wide, narrow, combining, zero-width, emoji (RGI, ZWJ, keycap, modifier), control and ANSI-coloured text.
const SAMPLES = ["", "abc", "Tidewater", "日本語", "ｱｲｳ", "e\u0301", "\u200b", "👍", "👍🏽", "👨‍👩‍👧", "1\u20e3", "#️⃣", "🇳🇿", "\u001b[31mred\u001b[39m", "a\tb", "한국어", "\u0000x", "Ω = 4.7 kΩ ± 1 %"];

const made = mkdtempSync(join(tmpdir(), "opgate-defer-init-"));
afterAll(() => rmSync(made, { recursive: true, force: true }));

describe("deferred top-level objects in string-width", () => {
  for (const [i, copy] of COPIES.entries()) {
    it(`${copy}: same widths as the published module`, async () => {
      const path = join(process.cwd(), copy);
      const source = readFileSync(path, "utf8");
      const { code, count } = deferTopLevelInit(source);
      expect(count).toBeGreaterThanOrEqual(2);
      expect(code).not.toMatch(/^const \w+ = new Intl\.Segmenter\(\);$/m);
      // The rewritten module beside a temporary folder: its imports point at the originals' dependencies.
      const require = createRequire(path);
      const rewritten = code.replace(/from '([^'.][^']*)'/g, (_m, spec: string) => `from '${pathToFileURL(require.resolve(spec)).href}'`);
      const file = join(made, `string-width-${i}.mjs`);
      writeFileSync(file, rewritten);
      const original = (await import(pathToFileURL(path).href)) as { default(s: string, o?: object): number };
      const deferred = (await import(pathToFileURL(file).href)) as { default(s: string, o?: object): number };
      for (const s of SAMPLES) {
        expect(deferred.default(s), JSON.stringify(s)).toBe(original.default(s));
        expect(deferred.default(s, { ambiguousIsNarrow: false }), JSON.stringify(s)).toBe(original.default(s, { ambiguousIsNarrow: false }));
      }
    });
  }

  it("leaves a module without such declarations as it is", () => {
    const source = "const x = 1;\nexport default x;\n";
    expect(deferTopLevelInit(source)).toEqual({ code: source, count: 0 });
  });
});
