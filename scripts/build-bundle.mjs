// Writes dist/bundle/: a small launcher (bin.js: --version, else it loads cli.js), the CLI, its
// lanes and its plugin host as one file each, with their
// dependencies (esbuild), so that a process start loads one module instead of hundreds. Part of
// `npm run build`, after tsc: it bundles the compiled dist/src. Left outside the bundle and
// loaded on first use as before: tsx (a TypeScript team rule) and junit-report-builder (--junit).
import { build } from "esbuild";
import { rmSync } from "node:fs";

const outdir = "dist/bundle";
rmSync(outdir, { recursive: true, force: true });
await build({
  entryPoints: { bin: "dist/src/bundle/bin.js", cli: "dist/src/bundle/cli.js", worker: "dist/src/bundle/worker.js", "plugin-host": "dist/src/bundle/plugin-host.js" },
  outdir,
  bundle: true,
  platform: "node",
  format: "esm",
  target: "node20",
  external: ["tsx", "tsx/*", "junit-report-builder"],
  // CommonJS dependencies call require(); an ES module has none of its own.
  banner: { js: 'import { createRequire as __opgateRequire } from "node:module"; const require = __opgateRequire(import.meta.url);' },
  legalComments: "none",
  logLevel: "warning",
});
