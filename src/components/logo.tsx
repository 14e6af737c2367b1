export function Logo({ className = 'h-8 w-8' }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect width="32" height="32" rx="7" fill="#12343b" />
      <path d="M3 13 Q16 21 29 13" stroke="#e8b04a" strokeWidth="2.5" fill="none" />
      <circle cx="16" cy="14.5" r="4" fill="#f4efe6" />
      <path d="M12 12h8" stroke="#12343b" strokeWidth="1.5" />
    </svg>
  );
}
