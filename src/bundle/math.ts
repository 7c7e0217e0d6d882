// The bundled CLI's share of mathjs: only the pieces the expression sandbox is made of
// (MATH_DEPENDENCIES in src/circuit/expressions.ts), imported by name so that the bundler leaves
// the rest of the library out. Imported first by every bundled entry.
import {
  absDependencies,
  addDependencies,
  compileDependencies,
  cosDependencies,
  create,
  divideDependencies,
  expDependencies,
  log10Dependencies,
  logDependencies,
  maxDependencies,
  minDependencies,
  multiplyDependencies,
  parseDependencies,
  powDependencies,
  sinDependencies,
  sqrtDependencies,
  subtractDependencies,
  tanDependencies,
  unaryMinusDependencies,
  unaryPlusDependencies,
} from "mathjs/number";
import { provideMathLibrary, type MathLibrary } from "../circuit/expressions.js";

export const BUNDLED_MATH: MathLibrary = {
  create,
  parseDependencies,
  compileDependencies,
  addDependencies,
  subtractDependencies,
  multiplyDependencies,
  divideDependencies,
  powDependencies,
  unaryMinusDependencies,
  unaryPlusDependencies,
  sqrtDependencies,
  expDependencies,
  logDependencies,
  log10Dependencies,
  absDependencies,
  minDependencies,
  maxDependencies,
  sinDependencies,
  cosDependencies,
  tanDependencies,
};

provideMathLibrary(BUNDLED_MATH);
