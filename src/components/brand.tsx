/** The Panelwise mark: a "P" whose bowl is a panel's half-point step, with an amber dot. */
export function BrandMark({ size = 40 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden="true">
      <rect width="32" height="32" rx="7" fill="#1f4e5f" />
      <path d="M9 22V10h7a4 4 0 0 1 0 8h-7" fill="none" stroke="#f4efe6" strokeWidth="3" strokeLinecap="round" strokeLinejoin="round" />
      <circle cx="23" cy="22" r="2.5" fill="#e0a458" />
    </svg>
  );
}
