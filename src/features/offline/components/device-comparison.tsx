import { compareWithServer } from '../../../../shared/offline/device-summary';
import type { TraceDetail } from '../../../../shared/schemas/traces';
import { Notice } from '../../../components/ui/notice';
import { countOf, formatDateTime, formatLength, type LengthUnit } from '../../../lib/format';

const TYPE_WORDS = {
  open: 'open',
  short: 'short',
  'impedance-rise': 'impedance rise',
  'impedance-drop': 'impedance drop',
} as const;

/**
 * A trace analysed on a phone before it was uploaded: whether the server's
 * analysis (with the library values of when it arrived) agrees with what the
 * technician saw in the field, and where it does not, both side by side.
 */
export function DeviceComparisonNotice({ trace, unit }: { trace: TraceDetail; unit: LengthUnit }) {
  const device = trace.deviceAnalysis;
  if (!device) return null;
  const when = formatDateTime(device.analysedAt);
  if (!trace.analysis) {
    return (
      <Notice tone="warn" title="The phone read this file; the server could not" className="mb-4">
        <p data-testid="device-comparison">
          On {when} the phone found {countOf(device.eventCount, 'event')} with engine {device.engineVersion}. The server&rsquo;s
          engine {trace.engineVersion} could not read the file.
        </p>
      </Notice>
    );
  }
  const diff = compareWithServer(device, trace.analysis);
  if (diff.same) {
    return (
      <Notice tone="info" className="mb-4">
        <p data-testid="device-comparison">
          Analysed on a phone first, {when}, before it was uploaded: the server&rsquo;s analysis agrees (engine{' '}
          {device.engineVersion}, VF {device.vf}).
        </p>
      </Notice>
    );
  }
  const rows: Array<[string, string, string]> = [];
  if (diff.engine) rows.push(['Engine', diff.engine.device, diff.engine.server]);
  if (diff.vf) rows.push(['Velocity factor', String(diff.vf.device), String(diff.vf.server)]);
  if (diff.vfTolerance)
    rows.push([
      'VF tolerance',
      `± ${(diff.vfTolerance.device * 100).toFixed(1)} %`,
      `± ${(diff.vfTolerance.server * 100).toFixed(1)} %`,
    ]);
  if (diff.eventCount) rows.push(['Events found', String(diff.eventCount.device), String(diff.eventCount.server)]);
  for (const e of diff.events) {
    const side = (x: { type: keyof typeof TYPE_WORDS; distanceM: number } | null) =>
      x ? `${formatLength(x.distanceM, unit)} (${TYPE_WORDS[x.type]})` : 'not found';
    rows.push([`Event ${e.index + 1}`, side(e.device), side(e.server)]);
  }
  return (
    <Notice tone="warn" title="The server's analysis differs from the phone's" className="mb-4">
      <div data-testid="device-comparison">
        <p>
          The phone analysed this file on {when}, before it was uploaded. The server analysed it again when it arrived, with the
          cable library as it is now; the findings use the server&rsquo;s values.
        </p>
        <table className="mt-2 w-full text-left text-sm tabular">
          <thead>
            <tr className="text-ink-soft">
              <th className="py-1 pr-2 font-semibold"></th>
              <th className="py-1 pr-2 font-semibold">On the phone</th>
              <th className="py-1 font-semibold">On the server</th>
            </tr>
          </thead>
          <tbody>
            {rows.map(([what, phone, server]) => (
              <tr key={what} className="border-t border-warn/30">
                <th className="py-1 pr-2 font-semibold">{what}</th>
                <td className="py-1 pr-2">{phone}</td>
                <td className="py-1">{server}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </Notice>
  );
}
