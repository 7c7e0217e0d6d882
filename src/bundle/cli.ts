// The bundled CLI proper (dist/bundle/cli.js): mathjs's share first, then the command line.
// Loaded by bin.ts once it knows it has more to do than print the version. The validators
// generated at build time are loaded through the code cache too (~0.5 MB of code).
import "./math.js";
import { provideCommonJsLoader } from "../load-generated.js";
import { codeCacheDir, loadBundled } from "./code-cache.js";

const codeCache = codeCacheDir(process.env);
provideCommonJsLoader((file, require) => loadBundled(file, codeCache, require));

export { run } from "../cli/main.js";
