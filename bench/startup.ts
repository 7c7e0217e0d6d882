// Benchmark of start-up: whole-process wall time of the CLI for bare `node -e 0`, `--version`, a
// one-file check without and with an expression (no plugin), and with the examples' TypeScript
// team rule — the bundled CLI (dist/bundle/bin.js, the package's `opgate`) beside the unbundled
// one (dist/src/cli/bin.js). Runs are interleaved (every command once per round) so a slow spell
// of the shared machine hits all of them; medians and the ratio to bare node of the same rounds.
// Needs `npm run build`. Run alone with `node dist/bench/startup.js`; `npm run bench` calls benchStartup().
import { spawnSync } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { PACKAGE_ROOT } from "../src/paths.js";

/** Targets from issue 15: one-file check with an expression and no plugin, --version; seconds and × bare node. */
export const TARGET_CHECK_SECONDS = 0.4;
export const TARGET_CHECK_RATIO = 2.5;
export const TARGET_VERSION_SECONDS = 0.25;
const ROUNDS = 7;

function wall(args: readonly string[], cwd: string): number {
  const start = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { cwd, encoding: "utf8", env: { ...process.env, CI: "true", NO_COLOR: "1", GITHUB_ACTIONS: "" } });
  if (r.status !== 0 && r.status !== 1) throw new Error(`${args.join(" ")} exited ${r.status}: ${r.stderr}`);
  return Number(process.hrtime.bigint() - start) / 1e9;
}

const median = (xs: number[]): number => [...xs].sort((a, b) => a - b)[xs.length >> 1]!;

export async function benchStartup(print: (line: string) => void = console.log): Promise<Record<string, number>> {
  const examples = join(PACKAGE_ROOT, "examples");
  const dir = mkdtempSync(join(tmpdir(), "opgate-bench-start-"));
  try {
    for (const f of ["soil-probe-excitation.yaml", "tide-gauge-preamp.yaml"]) cpSync(join(examples, f), join(dir, f));
    // A repository with the examples' team rule (TypeScript) for the plugin rows.
    const withRule = join(dir, "with-rule");
    mkdirSync(join(withRule, "node_modules"), { recursive: true });
    cpSync(join(examples, "team-rules"), join(withRule, "team-rules"), { recursive: true });
    cpSync(join(examples, "tide-gauge-preamp.yaml"), join(withRule, "tide-gauge-preamp.yaml"));
    writeFileSync(join(withRule, "opgate.config.yaml"), readFileSync(join(examples, "opgate.config.yaml"), "utf8"));
    symlinkSync(PACKAGE_ROOT, join(withRule, "node_modules", "opgate"), "dir");
    const bins = { bundled: join(PACKAGE_ROOT, "dist", "bundle", "bin.js"), unbundled: join(PACKAGE_ROOT, "dist", "src", "cli", "bin.js") };
    const rows: [string, readonly string[], string][] = [["bare node (node -e 0)", ["-e", "0"], dir]];
    for (const [kind, bin] of Object.entries(bins)) {
      rows.push([`${kind}: --version`, [bin, "--version"], dir]);
      rows.push([`${kind}: check, no expression`, [bin, "check", "soil-probe-excitation.yaml", "-q"], dir]);
      rows.push([`${kind}: check, with an expression`, [bin, "check", "tide-gauge-preamp.yaml", "-q"], dir]);
      rows.push([`${kind}: check, TypeScript team rule`, [bin, "check", "tide-gauge-preamp.yaml", "-q"], withRule]);
    }
    for (const [, args, cwd] of rows) wall(args, cwd); // untimed: file cache, tsx's transform cache
    const times = rows.map(() => [] as number[]);
    const ratios = rows.map(() => [] as number[]);
    for (let r = 0; r < ROUNDS; r++) {
      const round = rows.map(([, args, cwd]) => wall(args, cwd));
      round.forEach((t, i) => {
        times[i]!.push(t);
        ratios[i]!.push(t / round[0]!);
      });
    }
    print(`start-up (whole process, median of ${ROUNDS} interleaved rounds; ratio to bare node in the same round, median)`);
    const result: Record<string, number> = {};
    rows.forEach(([label], i) => {
      result[label] = median(times[i]!);
      print(`  ${label.padEnd(42)} ${median(times[i]!).toFixed(3).padStart(7)} s   ${median(ratios[i]!).toFixed(2).padStart(5)}×`);
    });
    const check = rows.findIndex(([l]) => l === "bundled: check, with an expression");
    const version = rows.findIndex(([l]) => l === "bundled: --version");
    print(
      `  targets: check with an expression ≤ ${TARGET_CHECK_SECONDS} s and ≤ ${TARGET_CHECK_RATIO}× bare: ` +
        `${median(times[check]!) <= TARGET_CHECK_SECONDS ? "met" : "missed"} / ${median(ratios[check]!) <= TARGET_CHECK_RATIO ? "met" : "missed"}; ` +
        `--version ≤ ${TARGET_VERSION_SECONDS} s: ${median(times[version]!) <= TARGET_VERSION_SECONDS ? "met" : "missed"}`,
    );
    return result;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) await benchStartup();
