/** The Saddlebook mark: a ridge and a valley crossing at a saddle point, with the wordmark. */
export function LogoMark({ size = 28 }: { size?: number }) {
  return (
    <svg width={size} height={size} viewBox="0 0 32 32" aria-hidden="true">
      <rect width="32" height="32" rx="7" fill="#223040" />
      <path d="M5 21 C11 21 12 11 16 11 C20 11 21 21 27 21" fill="none" stroke="#e2a676" strokeWidth="2.6" strokeLinecap="round" />
      <path
        d="M9 9 C13 13 14 17 16 17 C18 17 19 13 23 9"
        fill="none"
        stroke="#9fb2c2"
        strokeWidth="1.6"
        strokeLinecap="round"
        strokeDasharray="0.1 3.2"
      />
      <circle cx="16" cy="11" r="2.4" fill="#fbf4ee" />
    </svg>
  );
}

export function Wordmark() {
  return (
    <span className="flex items-center gap-2">
      <LogoMark />
      <span className="text-lg font-semibold tracking-tight text-white">
        Saddle<span className="text-copper-300">book</span>
      </span>
    </span>
  );
}
