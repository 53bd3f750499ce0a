import type { ReactNode } from 'react';
import { LINE_CONSTANT_FIELDS, LINE_CONSTANT_LABELS, type CableTypeView } from '../../../../shared/schemas/cables';
import type { LengthUnit } from '../../../lib/format';
import { formatAttenuationPoints, formatVf } from '../cable-format';

function Row({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="grid grid-cols-[9rem_1fr] gap-2 border-t border-rule py-2 text-sm first:border-t-0">
      <dt className="text-ink-soft">{label}</dt>
      <dd className="tabular">{children}</dd>
    </div>
  );
}

/** The entry's loss, line constants and pulse-width VFs, as rows of the entry's value list. */
export function CableLossDetails({ cable: c, unit }: { cable: CableTypeView; unit: LengthUnit }) {
  const constants = LINE_CONSTANT_FIELDS.filter((f) => c[f] !== null);
  return (
    <>
      <Row label="Attenuation">
        <span data-testid="cable-attenuation">{formatAttenuationPoints(c.attenuation, unit)}</span>
      </Row>
      {constants.length > 0 && (
        <Row label="Line constants">
          <ul data-testid="cable-line-constants">
            {constants.map((f) => (
              <li key={f}>
                {LINE_CONSTANT_LABELS[f].label}: {c[f]} {LINE_CONSTANT_LABELS[f].unit}
              </li>
            ))}
          </ul>
        </Row>
      )}
      {c.lossSource && <Row label="Loss source">{c.lossSource}</Row>}
      {c.pulseVfs.length > 0 && (
        <Row label="VF per pulse width">
          <ul data-testid="cable-pulse-vfs">
            {c.pulseVfs.map((p) => (
              <li key={p.pulseWidthNs}>
                {p.pulseWidthNs} ns: <span className="font-semibold">{formatVf(p.vf, 3)}</span>{' '}
                <span className="text-mist">({p.source})</span>
              </li>
            ))}
          </ul>
        </Row>
      )}
    </>
  );
}
