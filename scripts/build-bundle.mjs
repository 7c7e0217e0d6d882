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
import { createRequire } from "node:module";
import { resolve } from "node:path";
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
// Libraries a run seldom needs (src/bundle/vendor.ts): one file per group, loaded on first touch.
const VENDOR_GROUPS = {
  ajv: ["ajv", "ajv/dist/2020.js", "ajv/dist/standalone/index.js", "ajv-formats"],
  markdown: ["mdast-util-to-markdown", "mdast-util-gfm"],
  glob: ["fast-glob"],
};
const vendorKeys = {};
for (const [group, specs] of Object.entries(VENDOR_GROUPS)) {
  const file = `${outdir}/vendor-${group}.js`;
  await build({
    ...common,
    stdin: { contents: `module.exports = {\n${specs.map((spec) => `  ${JSON.stringify(spec)}: require(${JSON.stringify(spec)}),`).join("\n")}\n};\n`, resolveDir: process.cwd(), sourcefile: `vendor-${group}.js` },
    outdir: undefined,
    outfile: file,
    format: "cjs",
  });
  // Each package's own properties and whether they are enumerable: the stand-in lists them without loading.
  const loaded = createRequire(import.meta.url)(resolve(file));
  for (const spec of specs) {
    const exports = loaded[spec];
    vendorKeys[spec] = { group, keys: Object.fromEntries(Reflect.ownKeys(exports).filter((k) => typeof k === "string").map((k) => [k, Reflect.getOwnPropertyDescriptor(exports, k).enumerable])) };
  }
}
const vendorModule = resolve("dist/src/bundle/vendor.js");
const lazyVendors = {
  name: "lazy-vendors",
  setup(b) {
    const specs = Object.keys(vendorKeys);
    b.onResolve({ filter: new RegExp(`^(${specs.map((s) => s.replace(/[.*+?^${}()|[\]\\/]/g, "\\$&")).join("|")})$`) }, (args) => ({ path: args.path, namespace: "lazy-vendor" }));
    b.onLoad({ filter: /.*/, namespace: "lazy-vendor" }, (args) => {
      const { group, keys } = vendorKeys[args.path];
      return {
        contents: `const { lazyModule, vendorModule } = require(${JSON.stringify(vendorModule)});\nmodule.exports = lazyModule(() => vendorModule(${JSON.stringify(group)}, ${JSON.stringify(args.path)}), ${JSON.stringify(keys)});\n`,
        loader: "js",
        resolveDir: process.cwd(),
      };
    });
  },
};
const main = await build({
  ...common,
  metafile: true,
  plugins: [deferInit, lazyVendors],
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
// cli.js runs through the code cache (src/bundle/code-cache.ts). On Node 20 a script compiled from
// cached data loses its import() callback ("A dynamic import callback was not specified"): what
// it loads on demand must be require()d. The plugin host imports team rules, so it is not cached.
for (const [file, output] of Object.entries(main.metafile.outputs)) {
  const dynamic = output.imports.filter((i) => i.kind === "dynamic-import" && i.external);
  if (file.endsWith("/cli.js") && dynamic.length > 0) throw new Error(`build-bundle: ${file} imports ${dynamic.map((i) => i.path).join(", ")} with import(); it is loaded through the code cache, where import() fails on Node 20: require() it instead`);
}
// Where src/run/lane.ts starts a bundled lane.
writeFileSync(`${outdir}/worker.js`, `// Starts the bundled lane (an ES module: it waits at its top level).\nimport(require("node:url").pathToFileURL(require("node:path").join(__dirname, "lane.mjs")).href);\n`);
// A dependency update that changes string-width's shape must not lose this without a word.
if (deferred === 0) console.warn("build-bundle: string-width's top-level objects were not found; start-up will be ~40 ms slower (see src/bundle/defer-init.ts)");
