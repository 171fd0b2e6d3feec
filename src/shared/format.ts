/** Compute time for readers, the same words on the server's messages and on the screens. */

/** "0.42 compute-seconds", "42 compute-seconds", "10.0 compute-minutes", "3.00 compute-hours". */
export function formatComputeSeconds(seconds: number): string {
  if (seconds < 1) return `${seconds.toFixed(2)} compute-seconds`;
  if (seconds < 120) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} compute-seconds`;
  if (seconds < 7200) return `${(seconds / 60).toFixed(1)} compute-minutes`;
  return `${(seconds / 3600).toFixed(2)} compute-hours`;
}

/** Whole compute-seconds with the larger unit beside them: "1,234 compute-seconds (20.6 compute-minutes)". */
export function formatComputeTime(seconds: number): string {
  if (seconds < 120) return formatComputeSeconds(seconds);
  return `${Math.round(seconds).toLocaleString("en-US")} compute-seconds (${formatComputeSeconds(seconds)})`;
}
