/** The caution shown wherever people read agreement figures. */
export function Caution({ className = '' }: { className?: string }) {
  return (
    <aside className={`caution ${className}`} aria-label="How to read these figures">
      Agreement statistics describe how consistently classifiers rate, not whether any athlete's sport class is correct. Decisions about an
      athlete's class belong to the federation's rules and its licensed classifiers.
    </aside>
  );
}
