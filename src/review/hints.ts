// Hints that name the part: from a failing quantity's sensitivities, the parts that move it most,
// which way to move them and by how much, and which tolerance is worth tightening. The rule's own
// fixed advice stays only where no sensitivity applies (nominal mode, or nothing moves it).
import type { SensitivityEntry } from "../report/document.js";
import { formatQuantity } from "./quantities.js";

/** Parts named per hint. */
export const HINT_PARTS = 3;
/** The change the per-part figure is quoted for, %. */
export const HINT_STEP_PERCENT = 10;
/** Tolerance a tightening hint proposes, %. */
export const TIGHT_TOLERANCE_PERCENT = 1;
/**
 * A move is named only when it changes the quantity by at least this fraction of the shortfall
 * (|limit − measured|): a part that moves a 1.3 dB shortfall by a microdecibel is noise, not a fix,
 * and naming it sends the reviewer to the wrong part.
 */
export const HINT_MIN_SHARE = 0.01;

export interface HintInput {
  readonly measured: number;
  readonly limit: number;
  readonly unit: string | null;
  /** What the quantity is, for the sentence: "headroom", "power". */
  readonly quantity: string;
  readonly entries: readonly SensitivityEntry[];
  /** Nominal value and band of each parameter by key (tolerance parameters only are tightened). */
  readonly bands: ReadonlyMap<string, { nominal: number; min: number; max: number; kind: string }>;
}

function signed(v: number, unit: string | null): string {
  const s = formatQuantity(Math.abs(v), unit ?? "");
  return `${v < 0 ? "\u2212" : "+"}${s}`;
}

/** null when no part moves the quantity (the caller keeps the rule's own hint). */
export function sensitivityHint(h: HintInput): string | null {
  // The way the quantity must go: up when it is below its limit, down when above.
  const want = h.limit >= h.measured ? 1 : -1;
  const floor = HINT_MIN_SHARE * Math.abs(h.limit - h.measured);
  const perStep = (e: SensitivityEntry): number => Math.abs(e.derivative * h.bands.get(e.parameter)!.nominal * (HINT_STEP_PERCENT / 100));
  const parts = h.entries.filter((e) => h.bands.get(e.parameter)?.kind === "tolerance" && e.normalised !== null && e.normalised !== 0 && perStep(e) >= floor);
  const ranked = [...parts].sort((a, b) => Math.abs(b.normalised!) - Math.abs(a.normalised!)).slice(0, HINT_PARTS);
  const moves = ranked.map((e) => {
    const nominal = h.bands.get(e.parameter)!.nominal;
    const per = e.derivative * nominal * (HINT_STEP_PERCENT / 100);
    const raise = per * want > 0;
    return `${raise ? "raise" : "lower"} ${e.name}: ${signed(Math.abs(per) * want, h.unit)} ${h.quantity} per ${raise ? "+" : "\u2212"}${HINT_STEP_PERCENT} %`;
  });
  // Tightening: the worst case gains |∂m/∂p|·(half band − 1 % of nominal) for a part looser than 1 %.
  let tighten: string | null = null;
  let best = 0;
  for (const e of h.entries) {
    const b = h.bands.get(e.parameter);
    if (!b || b.kind !== "tolerance") continue;
    const half = (b.max - b.min) / 2;
    const tight = (TIGHT_TOLERANCE_PERCENT / 100) * Math.abs(b.nominal);
    if (half <= tight * (1 + 1e-9)) continue;
    const gain = Math.abs(e.derivative) * (half - tight);
    if (gain >= floor && gain > best) {
      best = gain;
      tighten = `tighten ${e.name} to ${TIGHT_TOLERANCE_PERCENT} %: worst-case ${h.quantity} ${signed(gain * want, h.unit)}`;
    }
  }
  const spread = h.entries.find((e) => {
    const kind = h.bands.get(e.parameter)?.kind;
    return (kind === "spread" || kind === "temperature") && Math.abs(e.high - e.low) >= floor && Math.abs(e.high - e.low) > 0;
  });
  const across = spread ? `${spread.name} alone moves it ${formatQuantity(Math.abs(spread.high - spread.low), h.unit ?? "")} across its range` : null;
  const pieces = [...moves, ...(tighten ? [tighten] : []), ...(across ? [across] : [])];
  return pieces.length ? pieces.join("; ") : null;
}
