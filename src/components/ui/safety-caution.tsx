/**
 * The standing safety caution shown wherever someone is about to connect an
 * instrument or act on a fault location. Wording follows common practice for
 * work on de-energised cables; it defers to local codes and the employer.
 */
export function SafetyCaution({ compact = false, className = '' }: { compact?: boolean; className?: string }) {
  return (
    <aside role="note" aria-label="Safety caution" className={`rounded-md border-2 border-warn bg-warn-light px-4 py-3 text-sm text-ink ${className}`}>
      <p className="font-bold">Safety first</p>
      <ul className={`mt-1 list-disc space-y-0.5 pl-5 ${compact ? 'text-xs' : ''}`}>
        <li>De-energise the cable, lock out and tag out, and verify it is dead before connecting any instrument.</li>
        <li>Discharge the cable's stored charge and keep it grounded until work starts.</li>
        <li>High-voltage fault-location methods (surge, thumping, burn-down) are for qualified persons only.</li>
        <li>Follow local codes, your employer's procedures and the permit for the work. Rholog's distances are guidance, not a permit to dig: locate other utilities before excavating.</li>
      </ul>
    </aside>
  );
}

/**
 * The short caution that stands right under a place to dig, where a phone
 * shows it long before the page's full safety caution.
 */
export function DigCaution({ className = '' }: { className?: string }) {
  return (
    <p className={`rounded-md border-l-4 border-warn bg-warn-light px-3 py-2 text-sm text-ink ${className}`} data-testid="dig-caution">
      Before anyone digs or climbs: cable de-energised, locked out and proven dead, stored charge discharged, and other utilities and lines
      located. Follow local codes and the permit for the work.
    </p>
  );
}
