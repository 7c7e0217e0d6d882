// Benchmark of start-up: whole-process wall time of the CLI for bare `node -e 0`, `--version`, a
// one-file check without and with an expression (no plugin), the same check with no code cache
// (a first run, or OPGATE_CODE_CACHE=off), and with the examples' policy: without its TypeScript
// team rule, with the rule compiled fresh (plugin cache emptied before each run) and with the
// rule from the plugin cache — the bundled CLI (dist/bundle/bin.js, the package's `opgate`)
// beside the unbundled one (dist/src/cli/bin.js). Runs are interleaved (every command once per
// round) so a slow spell of the shared machine hits all of them; medians and the ratio to bare
// node of the same rounds. The caches live in a temporary folder (OPGATE_CACHE_DIR), filled by
// one untimed round. Needs `npm run build`. Run alone with `node dist/bench/startup.js`;
// `npm run bench` calls benchStartup().
import { spawnSync } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { PACKAGE_ROOT } from "../src/paths.js";
import { PLUGIN_CACHE_FOLDER } from "../src/review/plugin-compile.js";

/** Targets from issue 15: one-file check with an expression and no plugin, --version; seconds and × bare node. */
export const TARGET_CHECK_SECONDS = 0.4;
export const TARGET_CHECK_RATIO = 2.5;
export const TARGET_VERSION_SECONDS = 0.25;
const ROUNDS = 7;

interface Row {
  readonly label: string;
  readonly args: readonly string[];
  readonly cwd: string;
  readonly env?: Readonly<Record<string, string>>;
  /** Untimed, before each run. */
  readonly before?: () => void;
}

function wall(row: Row, cacheDir: string): number {
  row.before?.();
  const { args, cwd } = row;
  const start = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { cwd, encoding: "utf8", env: { ...process.env, CI: "true", NO_COLOR: "1", GITHUB_ACTIONS: "", OPGATE_CACHE_DIR: cacheDir, ...row.env } });
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
    // The same policy without the team rule: what the rule itself costs is the difference.
    const policyOnly = join(dir, "policy-only");
    mkdirSync(policyOnly);
    cpSync(join(examples, "tide-gauge-preamp.yaml"), join(policyOnly, "tide-gauge-preamp.yaml"));
    const config = readFileSync(join(examples, "opgate.config.yaml"), "utf8");
    writeFileSync(join(policyOnly, "opgate.config.yaml"), config.replace(/^\s*tidewater\/divider-current:.*\n/m, "").replace(/^plugins:\n(\s+- .*\n)+/m, ""));
    const cacheDir = join(dir, "cache");
    const dropPlugins = () => rmSync(join(cacheDir, PLUGIN_CACHE_FOLDER), { recursive: true, force: true });
    const bins = { bundled: join(PACKAGE_ROOT, "dist", "bundle", "bin.js"), unbundled: join(PACKAGE_ROOT, "dist", "src", "cli", "bin.js") };
    const rows: Row[] = [{ label: "bare node (node -e 0)", args: ["-e", "0"], cwd: dir }];
    for (const [kind, bin] of Object.entries(bins)) {
      const check = ["check", "tide-gauge-preamp.yaml", "-q"];
      rows.push({ label: `${kind}: --version`, args: [bin, "--version"], cwd: dir });
      rows.push({ label: `${kind}: check, no expression`, args: [bin, "check", "soil-probe-excitation.yaml", "-q"], cwd: dir });
      rows.push({ label: `${kind}: check, with an expression`, args: [bin, ...check], cwd: dir });
      if (kind === "bundled") rows.push({ label: `${kind}: same, no code cache`, args: [bin, ...check], cwd: dir, env: { OPGATE_CODE_CACHE: "off" } });
      rows.push({ label: `${kind}: policy, no team rule`, args: [bin, ...check], cwd: policyOnly });
      rows.push({ label: `${kind}: policy + TS rule, compiled`, args: [bin, ...check], cwd: withRule, before: dropPlugins });
      rows.push({ label: `${kind}: policy + TS rule, cached`, args: [bin, ...check], cwd: withRule });
    }
    for (const row of rows) wall(row, cacheDir); // untimed: file cache, the code and plugin caches
    const times = rows.map(() => [] as number[]);
    const ratios = rows.map(() => [] as number[]);
    for (let r = 0; r < ROUNDS; r++) {
      const round = rows.map((row) => wall(row, cacheDir));
      round.forEach((t, i) => {
        times[i]!.push(t);
        ratios[i]!.push(t / round[0]!);
      });
    }
    print(`start-up (whole process, median of ${ROUNDS} interleaved rounds; ratio to bare node in the same round, median; load average ${loadavg().map((l) => l.toFixed(1)).join(" ")})`);
    const result: Record<string, number> = {};
    rows.forEach(({ label }, i) => {
      result[label] = median(times[i]!);
      print(`  ${label.padEnd(42)} ${median(times[i]!).toFixed(3).padStart(7)} s   ${median(ratios[i]!).toFixed(2).padStart(5)}×`);
    });
    const at = (label: string) => rows.findIndex((row) => row.label === label);
    const check = at("bundled: check, with an expression");
    const version = at("bundled: --version");
    print(
      `  targets: check with an expression ≤ ${TARGET_CHECK_SECONDS} s and ≤ ${TARGET_CHECK_RATIO}× bare: ` +
        `${median(times[check]!) <= TARGET_CHECK_SECONDS ? "met" : "missed"} / ${median(ratios[check]!) <= TARGET_CHECK_RATIO ? "met" : "missed"}; ` +
        `--version ≤ ${TARGET_VERSION_SECONDS} s: ${median(times[version]!) <= TARGET_VERSION_SECONDS ? "met" : "missed"}`,
    );
    const rule = median(times[at("bundled: policy + TS rule, cached")]!) - median(times[at("bundled: policy, no team rule")]!);
    const compile = median(times[at("bundled: policy + TS rule, compiled")]!) - median(times[at("bundled: policy + TS rule, cached")]!);
    print(`  the TypeScript team rule costs ${(rule * 1000).toFixed(0)} ms from the plugin cache (plugin thread, its import); compiling it adds ${(compile * 1000).toFixed(0)} ms (first run only)`);
    return result;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) await benchStartup();
