// `npm run bench`: every benchmark in one process, so the figures are comparable side by side.
// Each stage's benchmark lives beside this file and is also runnable alone.

type Bench = { name: string; load: () => Promise<() => Promise<unknown>> };

const BENCHES: Bench[] = [
  { name: "bias solve", load: async () => (await import("./solve.js")).benchSolve },
  { name: "small-signal", load: async () => (await import("./smallsignal.js")).benchSmallSignal },
  { name: "start-up", load: async () => (await import("./startup.js")).benchStartup },
  { name: "team rules contained", load: async () => (await import("./rules.js")).benchRules },
  { name: "repository run", load: async () => (await import("./repo.js")).benchRepo },
];

const only = process.argv.slice(2);
for (const b of BENCHES) {
  if (only.length > 0 && !only.some((o) => b.name.includes(o))) continue;
  console.log(`\n## ${b.name}\n`);
  try {
    await (await b.load())();
  } catch (err) {
    console.log(`benchmark failed: ${err instanceof Error ? err.message : String(err)}`);
    process.exitCode = 1;
  }
}
