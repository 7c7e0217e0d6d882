// Build-time rewrite for the bundle (scripts/build-bundle.mjs): a dependency that builds costly
// objects at its top level gets them built on first use instead. string-width (under yargs's help
// layout and the markdown tables) makes a `\p{RGI_Emoji}` regular expression and Intl.Segmenters
// when it is loaded: ~40 ms of every start (measured with --cpu-prof), for widths that a check
// never asks for. Each such `const NAME = <expression>;` becomes a stand-in that creates the real
// object when it is first touched and forwards everything to it (methods bound to it, so a
// regular expression's own state stays its own). Only whole top-level declarations of the kinds
// below are rewritten; test/package/defer-init.test.ts checks the rewritten module against the
// original on sample text.

/** Top-level declarations worth deferring: an Intl.Segmenter, or a regular expression of Unicode properties. */
const COSTLY_DECLARATION = /^const (\w+) = (new Intl\.Segmenter\(\)|\/.*\\p\{.*\/[a-z]*);$/gm;

/** The helper the rewritten declarations call (one copy per rewritten module). */
export const DEFER_HELPER = `function __opgateDeferred(make) {
  let real;
  const target = () => (real ??= make());
  return new Proxy({}, {
    get(_, key) {
      const it = target();
      const value = Reflect.get(it, key, it);
      return typeof value === "function" ? value.bind(it) : value;
    },
    set(_, key, value) {
      return Reflect.set(target(), key, value);
    },
    has(_, key) {
      return key in target();
    },
  });
}
`;

/** The module's text with its costly top-level objects built on first use; `count` rewritten. */
export function deferTopLevelInit(source: string): { readonly code: string; readonly count: number } {
  let count = 0;
  const code = source.replace(COSTLY_DECLARATION, (_whole, name: string, expression: string) => {
    count++;
    return `const ${name} = __opgateDeferred(() => ${expression});`;
  });
  return { code: count === 0 ? source : `${code}\n${DEFER_HELPER}`, count };
}
