/** The warnings an engine result carries, shown beside its numbers (nothing when there are none). */
export function ResultWarnings({ warnings }: { warnings: string[] }) {
  if (warnings.length === 0) return null;
  return (
    <ul role="alert" className="tk-card space-y-1 text-caption" data-testid="result-warnings">
      {warnings.map((w, i) => (
        <li key={i}>Warning: {w}</li>
      ))}
    </ul>
  );
}
