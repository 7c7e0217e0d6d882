// Libraries a run seldom needs, kept out of the bundled CLI's start: ajv (compiling a schema at
// run time: a team rule's options, a results document read back), the markdown writer (--markdown)
// and fast-glob (a folder or glob on the command line or in the config). The build
// (scripts/build-bundle.mjs) puts each group in a file of its own, dist/bundle/vendor-<group>.js,
// and hands the CLI, for each package, a stand-in that loads the group on first touch (through the
// code cache) and forwards everything to the package's real exports. Measured: ~8 ms less CPU in
// every start that does not need them (code-cache entry, module set-up).
import { fileURLToPath } from "node:url";
import { codeCacheDir, loadBundled } from "./code-cache.js";

const groups = new Map<string, Record<string, unknown>>();

/** The exports of package `spec` from vendor group `group`, loading the group on first use. */
export function vendorModule(group: string, spec: string): unknown {
  let loaded = groups.get(group);
  if (!loaded) {
    loaded = loadBundled(fileURLToPath(new URL(`./vendor-${group}.js`, import.meta.url)), codeCacheDir(process.env)) as Record<string, unknown>;
    groups.set(group, loaded);
  }
  return loaded[spec];
}

/**
 * A stand-in for a module's exports: `keys` (known at build time: name → enumerable) are its own
 * properties, and reading, calling or constructing it loads the real exports first. Listing its
 * properties does not (the bundler's interop copies them as getters when the CLI starts). A
 * function, so that a package whose exports are a function or a class (fast-glob, ajv) can be
 * called through it.
 */
export function lazyModule(load: () => unknown, keys: Readonly<Record<string, boolean>>): unknown {
  let real: object | undefined;
  const target = (): Record<PropertyKey, unknown> => (real ??= load() as object) as Record<PropertyKey, unknown>;
  const stub = function opgateLazyModule(): void {};
  return new Proxy(stub, {
    get(_, key) {
      const it = target();
      return Reflect.get(it, key, it);
    },
    has(_, key) {
      return key in target();
    },
    ownKeys() {
      // The stub's own fixed properties must be listed (a proxy's invariant).
      return [...new Set([...Object.keys(keys), ...Reflect.ownKeys(stub).filter((k) => !Reflect.getOwnPropertyDescriptor(stub, k)!.configurable)])];
    },
    getOwnPropertyDescriptor(_, key) {
      const fixed = Reflect.getOwnPropertyDescriptor(stub, key);
      if (fixed && !fixed.configurable) return fixed;
      if (typeof key !== "string" || !Object.hasOwn(keys, key)) return undefined;
      return { configurable: true, enumerable: keys[key], get: () => target()[key] };
    },
    apply(_, self, args) {
      return Reflect.apply(target() as unknown as (...a: unknown[]) => unknown, self, args);
    },
    construct(_, args, newTarget) {
      const it = target() as unknown as new (...a: unknown[]) => object;
      void newTarget;
      return Reflect.construct(it, args, it);
    },
  });
}
