// Repository policy after loading and validating opgate.config.(yaml|json) and applying flags.
import type { SourcePos } from "../circuit/types.js";
import type { Severity } from "../report/document.js";
import type { VariationSettings } from "../variation/types.js";

export interface RuleSetting {
  readonly severity?: Severity | "off";
  readonly options?: Readonly<Record<string, unknown>>;
  readonly pos?: SourcePos;
  /** Position of each key under `options`, for option errors (added by the review stage). */
  readonly optionsPos?: Readonly<Record<string, SourcePos>>;
}

export interface ResolvedConfig {
  /** The config file, or null when none was found (defaults apply). */
  readonly file: string | null;
  /** The config file as messages name it (relative to the working folder); added by the review stage. */
  readonly shownFile?: string;
  /** Folder paths and globs are relative to (the config file's folder, else the working directory). */
  readonly root: string;
  readonly include: readonly string[];
  readonly exclude: readonly string[];
  readonly rules: Readonly<Record<string, RuleSetting>>;
  /** Absolute paths of the model libraries every circuit uses, in the order listed. */
  readonly libraries: readonly string[];
  /** Absolute paths of team rule modules, globs expanded, sorted. */
  readonly plugins: readonly string[];
  readonly failOn: Severity;
  /** Files a folder or glob matches that are not circuit files: skipped (default) or an error. */
  readonly nonCircuitFiles?: "skip" | "error";
  readonly variation: VariationSettings;
  readonly outputs: {
    readonly json?: string;
    readonly junit?: string;
    readonly markdown?: string;
    readonly sarif?: string;
    readonly html?: string;
  };
}
