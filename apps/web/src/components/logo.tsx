/** Calmcrest's mark: a ridge line under a single star. */
export function Logo({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect width="32" height="32" rx="6" fill="#17343d" />
      <path d="M3 24 L11 13 L15 18 L20 9 L29 24 Z" fill="#9fd3c7" />
      <circle cx="23" cy="7" r="2" fill="#f3e6b3" />
    </svg>
  );
}
