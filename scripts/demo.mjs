// `npm run demo`: checks the bundled example boards and writes every report into reports/.
// The examples hold one failing design and one broken file on purpose, so the gate's own exit
// code is 2 here; this script explains that and succeeds only when the gate behaved as designed.
import { spawnSync } from "node:child_process";
import { mkdirSync } from "node:fs";

mkdirSync("reports", { recursive: true });
const args = [
  "dist/src/cli/bin.js",
  "check",
  "examples",
  "--config", "examples/opgate.config.yaml",
  "--json", "reports/results.json",
  "--junit", "reports/junit.xml",
  "--markdown", "reports/report.md",
  "--sarif", "reports/opgate.sarif",
];
const run = spawnSync(process.execPath, args, { stdio: "inherit" });
const code = run.status ?? 2;
const EXPECTED = 2; // one broken file (exit 2 wins over the failing design's exit 1)
console.log(`\nopgate exited with ${code}; reports are in reports/ (results.json, junit.xml, report.md, opgate.sarif).`);
if (code === EXPECTED) {
  console.log("That is the expected verdict: tide-gauge-preamp-rev-b fails its review and wind-vane-heater-broken is broken on purpose.");
} else {
  console.log(`Expected exit code ${EXPECTED} on the bundled examples; something changed.`);
  process.exitCode = 1;
}
