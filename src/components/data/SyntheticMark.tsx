/** The mark every synthetic (model-made) dataset carries wherever it is shown. */
export function SyntheticMark() {
  return (
    <span
      className={
        "ml-2 inline-flex items-center rounded-full border border-warm/50 bg-warm-soft px-2 py-0.5 " + "font-mono text-micro uppercase tracking-wider text-warm"
      }
      title="Made by the model with added noise, not measured"
      data-testid="synthetic-mark"
    >
      synthetic
    </span>
  );
}
