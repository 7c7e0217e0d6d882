// Writes dist/bundle/: a small launcher (bin.js: --version, else it loads cli.js through V8's code
// cache), the CLI, its lanes and its plugin host as one file each, with their dependencies
// (esbuild), so that a process start loads one module instead of hundreds. The files are
// CommonJS (dist/bundle/package.json says so): a CommonJS file can be compiled with a code cache
// on every Node the package supports, and requiring Node's own modules from it is cheaper than
// importing them (an ES import of node:fs builds its whole export list, streams included). The
// lane waits at its top level, which only an ES module may: it is lane.mjs, started through the
// two-line worker.js. Part of `npm run build`, after tsc: it bundles the compiled dist/src. Left
// outside the bundle and loaded on first use: tsx (a TypeScript team rule) and
// junit-report-builder (--junit).
import { build } from "esbuild";
import { mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { deferTopLevelInit } from "../dist/src/bundle/defer-init.js";

const outdir = "dist/bundle";
rmSync(outdir, { recursive: true, force: true });
mkdirSync(outdir, { recursive: true });
writeFileSync(`${outdir}/package.json`, `${JSON.stringify({ type: "commonjs" }, null, 2)}\n`);
// string-width builds a Unicode-property regular expression and segmenters at load (~40 ms of
// every start): built on first use instead (src/bundle/defer-init.ts).
let deferred = 0;
const deferInit = {
  name: "defer-init",
  setup(b) {
    b.onLoad({ filter: /[\\/]string-width[\\/]index\.js$/ }, (args) => {
      const { code, count } = deferTopLevelInit(readFileSync(args.path, "utf8"));
      deferred += count;
      return { contents: code, loader: "js" };
    });
  },
};
const common = { outdir, bundle: true, platform: "node", target: "node20", external: ["tsx", "tsx/*", "junit-report-builder", "esbuild"], legalComments: "none", logLevel: "warning", plugins: [deferInit] };
await build({
  ...common,
  entryPoints: { bin: "dist/src/bundle/bin.js", cli: "dist/src/bundle/cli.js", "plugin-host": "dist/src/bundle/plugin-host.js" },
  format: "cjs",
  // The sources are ES modules: import.meta.url is the bundle file's URL, as it was.
  define: { "import.meta.url": "__opgateFileUrl" },
  banner: { js: 'const __opgateFileUrl = require("node:url").pathToFileURL(__filename).href;' },
});
await build({
  ...common,
  entryPoints: { lane: "dist/src/bundle/worker.js" },
  outExtension: { ".js": ".mjs" },
  format: "esm",
  // CommonJS dependencies call require(); an ES module has none of its own.
  banner: { js: 'import { createRequire as __opgateRequire } from "node:module"; const require = __opgateRequire(import.meta.url);' },
});
// Where src/run/lane.ts starts a bundled lane.
writeFileSync(`${outdir}/worker.js`, `// Starts the bundled lane (an ES module: it waits at its top level).\nimport(require("node:url").pathToFileURL(require("node:path").join(__dirname, "lane.mjs")).href);\n`);
// A dependency update that changes string-width's shape must not lose this without a word.
if (deferred === 0) console.warn("build-bundle: string-width's top-level objects were not found; start-up will be ~40 ms slower (see src/bundle/defer-init.ts)");
