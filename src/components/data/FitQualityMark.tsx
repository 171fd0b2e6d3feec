import type { FitFlag, FitQuality } from "@/shared/api";

/** Each problem code of a fit (FitFlag, src/shared/api/fits.ts) in a few words, for the mark's description. */
export const FIT_FLAG_WORDS: Record<FitFlag, string> = {
  chi2_high: "the model does not describe the data (χ² too high)",
  chi2_low: "χ² too low (uncertainties too large?)",
  not_moved: "the fit did not move from its start",
  on_bound: "a parameter is on a bound",
  undetermined: "a parameter the data cannot determine",
  competing_minima: "other starts ended in different minima of similar χ²",
  not_converged: "did not converge",
};

/**
 * The "poor fit" mark a succeeded fit with any warning carries in lists and on its page: words,
 * not colour alone; the problems are named in its accessible description. A fit without a
 * verdict (stored before the checks existed) carries a "not checked" mark instead.
 */
export function FitQualityMark({ quality, flags }: { quality: FitQuality | undefined; flags: FitFlag[] | undefined }) {
  // A fit stored before the checks existed has no verdict: say so rather than look good.
  if (quality === undefined)
    return (
      <span
        className="ml-2 inline-flex items-center rounded-full border border-line-strong px-2 py-0.5 font-mono text-micro uppercase tracking-wider text-fg-soft"
        title="This fit was made before Triskel checked fits for problems; run it again to have it checked."
        data-testid="unchecked-fit-mark"
      >
        not checked<span className="sr-only">: made before fits were checked for problems; run it again</span>
      </span>
    );
  if (quality !== "poor" || !flags) return null;
  const why = flags.map((f) => FIT_FLAG_WORDS[f] ?? f).join("; ");
  return (
    <span
      className="ml-2 inline-flex items-center rounded-full border border-danger/50 bg-danger-soft px-2 py-0.5 font-mono text-micro uppercase tracking-wider text-danger"
      title={why}
      data-testid="poor-fit-mark"
      data-flags={flags.join(" ")}
    >
      poor fit<span className="sr-only">: {why}</span>
    </span>
  );
}
