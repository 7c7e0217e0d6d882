// The bundled CLI proper (dist/bundle/cli.js): mathjs's share first, then the command line.
// Loaded by bin.ts once it knows it has more to do than print the version.
import "./math.js";
export { run } from "../cli/main.js";
