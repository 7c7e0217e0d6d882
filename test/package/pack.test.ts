// The package as a user gets it: `npm pack` (what would be published), installed into an empty
// temporary repository from the tarball, offline from the npm cache (npm ci has filled it), and
// run there: `opgate check` on a circuit, then `opgate init` and `opgate check` again. It must
// ship what runs and nothing else (no tests, benchmarks or source maps).
import { execFileSync, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PACKAGE_ROOT } from "../../src/paths.js";

const npm = process.platform === "win32" ? "npm.cmd" : "npm";
let work: string;
let tarball: string;
let files: string[];

beforeAll(() => {
  if (!existsSync(join(PACKAGE_ROOT, "dist", "bundle", "bin.js"))) throw new Error("build the package first (npm run build): the tarball ships dist/");
  work = mkdtempSync(join(tmpdir(), "opgate-pack-"));
  // --ignore-scripts: the build already ran; packing must not rebuild under the test.
  const out = execFileSync(npm, ["pack", "--ignore-scripts", "--json", "--pack-destination", work], { cwd: PACKAGE_ROOT, encoding: "utf8" });
  const info = JSON.parse(out) as { filename: string; files: { path: string }[] }[];
  tarball = join(work, info[0]!.filename);
  files = info[0]!.files.map((f) => f.path);
}, 120_000);
afterAll(() => rmSync(work, { recursive: true, force: true }));

type LockEntry = Record<string, unknown> & { dev?: boolean; devOptional?: boolean; link?: boolean };

function writeLockedRepo(repo: string, tgz: string): void {
  const lock = JSON.parse(readFileSync(join(PACKAGE_ROOT, "package-lock.json"), "utf8")) as { packages: Record<string, LockEntry> };
  const pkg = JSON.parse(readFileSync(join(PACKAGE_ROOT, "package.json"), "utf8")) as Record<string, unknown>;
  const spec = `file:${tgz}`;
  const integrity = `sha512-${createHash("sha512").update(readFileSync(tgz)).digest("base64")}`;
  const packages: Record<string, unknown> = {
    "": { name: "boards", devDependencies: { opgate: spec } },
    "node_modules/opgate": { version: pkg.version, resolved: spec, integrity, dev: true, license: pkg.license, dependencies: pkg.dependencies, bin: pkg.bin, engines: pkg.engines },
  };
  for (const [path, entry] of Object.entries(lock.packages)) {
    if (path === "" || entry.dev || entry.devOptional || entry.link) continue;
    packages[path] = { ...entry, dev: true };
  }
  writeFileSync(join(repo, "package.json"), `${JSON.stringify({ name: "boards", private: true, devDependencies: { opgate: spec } }, null, 2)}\n`);
  writeFileSync(join(repo, "package-lock.json"), `${JSON.stringify({ name: "boards", lockfileVersion: 3, requires: true, packages }, null, 2)}\n`);
}

describe("the published package", () => {
  it("ships only what runs, with a license", () => {
    expect(files).toContain("LICENSE");
    expect(files).toContain("package.json");
    expect(files).toContain("dist/bundle/bin.js");
    expect(files).toContain("schemas/circuit.schema.json");
    expect(files).toContain("src/cli/starter/divider-current.mjs");
    // From examples/, only the model library that `opgate init` copies as the starter library.
    expect(files.filter((f) => /(^|\/)(test|bench)\/|\.test\.|\.map$|^examples\/(?!lib\/)/.test(f))).toEqual([]);
    expect(files.length).toBeLessThan(400);
  });

  it("installs from the tarball into an empty repository, offline, and checks circuits there", () => {
    const repo = join(work, "repo");
    mkdirSync(join(repo, "boards"), { recursive: true });
    execFileSync("git", ["init", "-q", repo]);
    for (const f of readdirSync(join(PACKAGE_ROOT, "examples")).filter((x) => /^tide-gauge-preamp(-rev-b)?\.yaml$/.test(x))) {
      copyFileSync(join(PACKAGE_ROOT, "examples", f), join(repo, "boards", f));
    }
    // Offline: `npm install <tarball>` would ask the registry for each dependency's metadata, which
    // `npm ci` never caches. So the repository gets a lock file that pins the tarball and every
    // runtime dependency exactly as this package's lock does (its entries not marked dev), and
    // `npm ci --offline` installs them from the cache by integrity.
    writeLockedRepo(repo, tarball);
    const install = spawnSync(npm, ["ci", "--offline", "--no-audit", "--no-fund"], { cwd: repo, encoding: "utf8", timeout: 240_000 });
    expect(install.status, `${install.stdout}\n${install.stderr}`).toBe(0);
    const bin = join(repo, "node_modules", ".bin", "opgate");
    expect(existsSync(bin)).toBe(true);

    const check = spawnSync(bin, ["check", "boards", "--json", "reports/results.json"], { cwd: repo, encoding: "utf8", timeout: 120_000 });
    // The failing example fails the gate (exit 1); the passing one passes; nothing crashed.
    expect(check.status, `${check.stdout}\n${check.stderr}`).toBe(1);
    expect(check.stdout).toMatch(/^ok +boards\/tide-gauge-preamp\.yaml/m);
    expect(check.stdout).toMatch(/^fail +boards\/tide-gauge-preamp-rev-b\.yaml/m);
    expect(check.stderr).toContain("opgate: no config file: built-in defaults");
    expect(existsSync(join(repo, "reports", "results.json"))).toBe(true);

    const init = spawnSync(bin, ["init"], { cwd: repo, encoding: "utf8", timeout: 60_000 });
    expect(init.status, init.stderr).toBe(0);
    const again = spawnSync(bin, ["check", "boards"], { cwd: repo, encoding: "utf8", timeout: 120_000 });
    expect(again.stderr).toContain("opgate: config opgate.config.yaml");
    expect(again.stdout).toContain("team/divider-current");
    expect(again.status, `${again.stdout}\n${again.stderr}`).toBe(1);

    // A TypeScript team rule in the installed package: compiled by the package's own esbuild (a
    // runtime dependency); nothing from the development tree (tsx, typescript) is installed.
    expect(existsSync(join(repo, "node_modules", "tsx"))).toBe(false);
    mkdirSync(join(repo, "ts-rules"));
    copyFileSync(join(PACKAGE_ROOT, "examples", "team-rules", "divider-current.ts"), join(repo, "ts-rules", "divider-current.ts"));
    writeFileSync(join(repo, "ts.config.yaml"), "plugins:\n  - ts-rules/divider-current.ts\n");
    const ts = spawnSync(bin, ["check", "boards", "--config", "ts.config.yaml"], { cwd: repo, encoding: "utf8", timeout: 120_000, env: { ...process.env, OPGATE_CACHE_DIR: join(work, "cache") } });
    expect(ts.stdout).toContain("tidewater/divider-current");
    expect(ts.status, `${ts.stdout}\n${ts.stderr}`).toBe(1);
  }, 400_000);
});
