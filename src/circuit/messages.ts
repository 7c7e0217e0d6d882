// Circuit-specific wording of schema errors: names the item ("component R3", "model small-npn")
// and turns pin errors into "component R3 of kind resistor needs pins [a, b]".
import type { ErrorObject } from "ajv";
import type { PathSegment } from "./positions.js";
import { didYouMean } from "./suggest.js";
import type { DescribePath, RewriteError } from "./validate.js";

/** The pins each kind takes, as the file writes them. */
export const PIN_TEXT: Readonly<Record<string, string>> = {
  resistor: "[a, b]",
  capacitor: "[a, b]",
  inductor: "[a, b]",
  "voltage-source": "{plus, minus}",
  "current-source": "{from, to}",
  diode: "{anode, cathode}",
  npn: "{collector, base, emitter}",
  pnp: "{collector, base, emitter}",
  nmos: "{drain, gate, source, body?}",
  pmos: "{drain, gate, source, body?}",
  vcvs: "{plus, minus, controlPlus, controlMinus}",
  vccs: "{plus, minus, controlPlus, controlMinus}",
  cccs: "{plus, minus}",
  ccvs: "{plus, minus}",
};

type Obj = Record<string, unknown>;
const get = (v: unknown, k: PathSegment): unknown => (v !== null && typeof v === "object" ? (v as Obj)[k as string] : undefined);

function fieldText(rest: readonly PathSegment[]): string {
  return rest.map((s) => (typeof s === "number" ? `[${s}]` : s)).join(".").replace(/\.\[/g, "[");
}

function componentName(root: unknown, index: number): string {
  const id = get(get(get(root, "components"), index), "id");
  return typeof id === "string" ? `component ${id}` : `component #${index + 1}`;
}

/** The id of the component, model or gain spec a path points into: the subject of its finding. */
export function circuitSubject(path: readonly PathSegment[], root: unknown): string | undefined {
  const [a, b, c] = path;
  if (a === "components" && typeof b === "number") {
    const id = get(get(get(root, "components"), b), "id");
    return typeof id === "string" ? id : undefined;
  }
  if (a === "models" && typeof b === "string") return b;
  if (a === "specs" && b === "gains" && typeof c === "number") {
    const name = get(get(get(get(root, "specs"), "gains"), c), "name");
    return typeof name === "string" ? name : undefined;
  }
  if (a === "specs" && b === "devices" && typeof c === "string") return c;
  return undefined;
}

/** Names the item a path points into, plus the field within it. */
export const describeCircuitPath: DescribePath = (path, root) => {
  let item: string | undefined;
  let rest: readonly PathSegment[] = [];
  const [a, b, c] = path;
  if (a === "components" && typeof b === "number") {
    item = componentName(root, b);
    rest = path.slice(2);
  } else if (a === "models" && b !== undefined) {
    item = `model ${String(b)}`;
    rest = path.slice(2);
  } else if (a === "specs" && b === "gains" && typeof c === "number") {
    const name = get(get(get(get(root, "specs"), "gains"), c), "name");
    item = typeof name === "string" ? `gain spec \`${name}\`` : `gain spec #${c + 1}`;
    rest = path.slice(3);
  } else if (a === "specs" && b === "supplies" && typeof c === "number") {
    item = `supply spec #${c + 1}`;
    rest = path.slice(3);
  } else if (a === "specs" && b === "devices" && c !== undefined) {
    item = `device spec \`${String(c)}\``;
    rest = path.slice(3);
  } else if (a === "review" && b !== undefined) {
    item = `review override \`${String(b)}\``;
    rest = path.slice(2);
  } else if (path.length === 0) return "the circuit file";
  else return `\`${fieldText(path)}\``;
  return rest.length ? `\`${fieldText(rest)}\` of ${item}` : item;
};

/** Pin and kind errors in the words of the trade. */
export const rewriteCircuitError: RewriteError = (e: ErrorObject, path, root) => {
  const [a, b, c] = path;
  if (a !== "components" || typeof b !== "number") return undefined;
  const comp = get(get(root, "components"), b);
  const kind = get(comp, "kind");
  const name = componentName(root, b);
  const pinsError = c === "pins" || (e.keyword === "required" && (e.params as { missingProperty?: string }).missingProperty === "pins" && path.length === 2);
  if (pinsError && typeof kind === "string" && PIN_TEXT[kind]) {
    const need = `${name} of kind ${kind} needs pins ${PIN_TEXT[kind]}`;
    const pinNames = PIN_TEXT[kind]!.replace(/[[\]{}?\s]/g, "").split(",");
    switch (e.keyword) {
      case "additionalProperties": {
        const key = String((e.params as { additionalProperty: string }).additionalProperty);
        return { message: need, hint: `\`${key}\` is not a pin of a ${kind}${didYouMean(key, pinNames) ? `; ${didYouMean(key, pinNames)}` : ""}` };
      }
      case "required":
        return path.length === 2 ? { message: need, hint: "add `pins:`" } : { message: need, hint: `pin \`${(e.params as { missingProperty: string }).missingProperty}\` is missing` };
      case "minItems":
      case "maxItems":
        return { message: need, hint: "give exactly two node names" };
      case "type":
        if (path.length > 3) return { message: need, hint: `pin \`${String(path[3])}\`: a node name is text or a whole number` };
        return { message: need, hint: PIN_TEXT[kind]!.startsWith("[") ? "write the two node names as a list" : "write a mapping of pin name to node name" };
      default:
        return undefined;
    }
  }
  if (c === "kind" && path.length === 3 && e.keyword === "enum") {
    const kinds = Object.keys(PIN_TEXT);
    return { message: `${name} has unknown kind \`${String(kind)}\``, hint: didYouMean(String(kind), kinds) ?? `kinds: ${kinds.join(", ")}` };
  }
  return undefined;
};
