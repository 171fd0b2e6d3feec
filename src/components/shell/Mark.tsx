/** Triskel's mark: a triangle of one-way walls around a node (matches src/app/icon.svg). */
export function Mark({ size = 28 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden focusable="false">
      <rect width="32" height="32" rx="7" fill="#14212b" />
      <g fill="none" stroke="#f6c56b" strokeWidth="2.4" strokeLinecap="round">
        <path d="M16 6 L25 21.5" />
        <path d="M25 21.5 L7 21.5" />
        <path d="M7 21.5 L16 6" />
      </g>
      <circle cx="16" cy="16.3" r="2.6" fill="#7fcabb" />
    </svg>
  );
}
