import { useState, type ReactNode } from 'react';
import {
  awgDiameterM,
  coax,
  delayNsPerFt,
  delayNsPerM,
  DerivationError,
  ftToM,
  lineFromLC,
  mToFt,
  twoWire,
  vfFromPermittivity,
  type LineGeometryResult,
} from '../../../../shared/cable/derivations';
import { M_PER_FT } from '../../../../shared/cable/propagation';
import type { CableTypeInput } from '../../../../shared/schemas/cables';
import { Button } from '../../../components/ui/button';
import { Card } from '../../../components/ui/card';
import { SelectField, TextField } from '../../../components/ui/field';
import type { LengthUnit } from '../../../lib/format';

export type CalculatedEntry = Pick<CableTypeInput, 'vf' | 'vfSource' | 'vfReference'> & Partial<Pick<CableTypeInput, 'z0Ohm' | 'construction'>>;

/** A typed number; empty or unreadable gives NaN, which the derivations refuse with a message. */
function num(s: string): number {
  const t = s.trim().replace(',', '.');
  return /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : Number.NaN;
}

/** Runs a derivation; a DerivationError becomes { field, message } for the form. */
function attempt<T>(fn: () => T): { value: T; error: null } | { value: null; error: DerivationError } {
  try {
    return { value: fn(), error: null };
  } catch (e) {
    if (e instanceof DerivationError) return { value: null, error: e };
    throw e;
  }
}

const sig = (v: number, digits = 4) => (Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : '—');

function Results({ rows, testId }: { rows: Array<[ReactNode, ReactNode]>; testId: string }) {
  return (
    <dl className="mt-3 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 rounded-md bg-paper p-3 text-sm tabular" aria-live="polite" data-testid={testId}>
      {rows.map(([k, v], i) => (
        <div key={i} className="contents">
          <dt className="text-ink-soft">{k}</dt>
          <dd className="font-semibold">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

function Problem({ error }: { error: DerivationError }) {
  return (
    <p className="mt-3 text-sm font-semibold text-danger" role="status">
      {error.message}
    </p>
  );
}

/** L·C beside μ·ε: equal for every geometry, which is why the velocity depends on the dielectric alone. */
function lcRows(r: LineGeometryResult, unit: LengthUnit): Array<[ReactNode, ReactNode]> {
  const perLen = unit === 'ft' ? M_PER_FT : 1;
  return [
    ['Z0', `${sig(r.z0Ohm)} Ω`],
    [`L`, `${sig(r.lHPerM * perLen * 1e9)} nH/${unit}`],
    [`C`, `${sig(r.cFPerM * perLen * 1e12)} pF/${unit}`],
    ['VF = 1/(c·√(LC))', sig(r.vf)],
    ['Delay', unit === 'ft' ? `${sig(r.delayNsPerM * M_PER_FT)} ns/ft` : `${sig(r.delayNsPerM)} ns/m`],
    [
      'L·C and μ·ε',
      <span key="lc">
        {r.lc.toExponential(4)} = {r.muEpsilon.toExponential(4)} s²/m²
        <span className="block text-xs font-normal text-mist">The same for any geometry: the dielectric alone sets the velocity.</span>
      </span>,
    ],
  ];
}

/**
 * The planner's calculator: VF from permittivity, from L and C, from coax or
 * two-wire geometry; delays and m ↔ ft. Everything updates as they type.
 */
export function CableCalculator({ unit, onUse }: { unit: LengthUnit; onUse?: (entry: CalculatedEntry) => void }) {
  const dia = unit === 'ft' ? 'in' : 'mm';
  const diaToM = (v: number) => (unit === 'ft' ? v * 0.0254 : v / 1000);
  const perLen = unit === 'ft' ? M_PER_FT : 1;

  const [er, setEr] = useState('2.26');
  const [mr, setMr] = useState('1');
  const perm = attempt(() => vfFromPermittivity(num(er), num(mr)));

  const [l, setL] = useState(unit === 'ft' ? '76.2' : '250');
  const [c, setC] = useState(unit === 'ft' ? '30.5' : '100');
  const lc = attempt(() => lineFromLC((num(l) * 1e-9) / perLen, (num(c) * 1e-12) / perLen));

  const [outer, setOuter] = useState(unit === 'ft' ? '0.116' : '2.95');
  const [inner, setInner] = useState(unit === 'ft' ? '0.032' : '0.81');
  const [coaxEr, setCoaxEr] = useState('2.26');
  const cx = attempt(() => coax({ outerDiameter: diaToM(num(outer)), innerDiameter: diaToM(num(inner)), epsilonR: num(coaxEr) }));

  const [gauge, setGauge] = useState('');
  const [wire, setWire] = useState(unit === 'ft' ? '0.0808' : '2.053');
  const [spacing, setSpacing] = useState(unit === 'ft' ? '6' : '152.4');
  const [twEr, setTwEr] = useState('1');
  const wireM = gauge !== '' ? awgDiameterM(Number(gauge)) : diaToM(num(wire));
  const tw = attempt(() => twoWire({ wireDiameter: wireM, spacing: diaToM(num(spacing)), epsilonR: num(twEr) }));

  const [meters, setMeters] = useState('100');
  const [feet, setFeet] = useState(sig(mToFt(100), 7));
  const [delayVf, setDelayVf] = useState('0.66');
  const delay = attempt(() => ({ m: delayNsPerM(num(delayVf)), ft: delayNsPerFt(num(delayVf)) }));

  const use = (entry: CalculatedEntry) =>
    onUse && (
      <Button variant="secondary" className="mt-3" onClick={() => onUse(entry)}>
        Start a cable type with these values
      </Button>
    );

  return (
    <div className="grid gap-4 xl:grid-cols-2">
      <Card title="From the dielectric">
        <p className="mb-3 text-sm text-ink-soft">VF = 1/√(εr·μr). Solid PE is about 2.26, PTFE 2.1, air 1.</p>
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label="Relative permittivity εr" inputMode="decimal" value={er} onChange={(e) => setEr(e.target.value)} error={perm.error?.field === 'epsilonR' ? 'see below' : undefined} />
          <TextField label="Relative permeability μr" inputMode="decimal" value={mr} onChange={(e) => setMr(e.target.value)} error={perm.error?.field === 'muR' ? 'see below' : undefined} />
        </div>
        {perm.error ? (
          <Problem error={perm.error} />
        ) : (
          <Results
            testId="calc-permittivity"
            rows={[
              ['VF', sig(perm.value)],
              ['Delay', unit === 'ft' ? `${sig(delayNsPerFt(perm.value))} ns/ft` : `${sig(delayNsPerM(perm.value))} ns/m`],
            ]}
          />
        )}
        {perm.value !== null && use({ vf: Number(perm.value.toFixed(4)), vfSource: 'calculated', vfReference: `Calculated from εr = ${er}, μr = ${mr}: VF = 1/√(εr·μr).` })}
      </Card>

      <Card title="From inductance and capacitance">
        <p className="mb-3 text-sm text-ink-soft">u = 1/√(LC), VF = u/c, Z0 = √(L/C), per unit length from a datasheet.</p>
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label={`Inductance L (nH/${unit})`} inputMode="decimal" value={l} onChange={(e) => setL(e.target.value)} />
          <TextField label={`Capacitance C (pF/${unit})`} inputMode="decimal" value={c} onChange={(e) => setC(e.target.value)} />
        </div>
        {lc.error ? (
          <Problem error={lc.error} />
        ) : (
          <Results
            testId="calc-lc"
            rows={[
              ['VF', sig(lc.value.vf)],
              ['Z0', `${sig(lc.value.z0Ohm)} Ω`],
              ['Velocity', `${sig(lc.value.velocityMPerS / 1e6)} m/µs`],
              ['Implied εr·μr', sig(lc.value.epsilonMuR)],
            ]}
          />
        )}
        {lc.value &&
          use({
            vf: Number(lc.value.vf.toFixed(4)),
            z0Ohm: Number(lc.value.z0Ohm.toFixed(1)),
            vfSource: 'calculated',
            vfReference: `Calculated from L = ${l} nH/${unit}, C = ${c} pF/${unit}: VF = 1/(c·√(LC)), Z0 = √(L/C).`,
          })}
      </Card>

      <Card title="Coaxial line">
        <p className="mb-3 text-sm text-ink-soft">
          Z0 = (60/√εr)·ln(D/d), L = (μ/2π)·ln(D/d), C = 2πε/ln(D/d). D is the dielectric’s diameter (inside the screen), d the inner conductor’s.
        </p>
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label={`Dielectric diameter D (${dia})`} inputMode="decimal" value={outer} onChange={(e) => setOuter(e.target.value)} />
          <TextField label={`Inner conductor d (${dia})`} inputMode="decimal" value={inner} onChange={(e) => setInner(e.target.value)} />
          <TextField label="εr" inputMode="decimal" value={coaxEr} onChange={(e) => setCoaxEr(e.target.value)} />
        </div>
        {cx.error ? <Problem error={cx.error} /> : <Results testId="calc-coax" rows={lcRows(cx.value, unit)} />}
        {cx.value &&
          use({
            construction: 'coax',
            vf: Number(cx.value.vf.toFixed(4)),
            z0Ohm: Number(cx.value.z0Ohm.toFixed(1)),
            vfSource: 'calculated',
            vfReference: `Calculated for coax D = ${outer} ${dia}, d = ${inner} ${dia}, εr = ${coaxEr}.`,
          })}
      </Card>

      <Card title="Two-wire line">
        <p className="mb-3 text-sm text-ink-soft">
          Z0 = (120/√εr)·acosh(s/d); when s ≫ d, the thin-wire limit L = (μ/π)·ln(2s/d), C = πε/ln(2s/d). For twin lead use the effective εr (1/VF²) — part of the field is in air.
        </p>
        <div className="grid gap-3 sm:grid-cols-2">
          <SelectField label="Wire gauge (AWG)" value={gauge} onChange={(e) => setGauge(e.target.value)}>
            <option value="">Type the diameter</option>
            {[10, 12, 14, 16, 18, 20, 22, 24, 26].map((g) => (
              <option key={g} value={g}>
                No. {g} ({sig(awgDiameterM(g) * 1000, 3)} mm)
              </option>
            ))}
          </SelectField>
          <TextField label={`Wire diameter d (${dia})`} inputMode="decimal" value={gauge ? sig(unit === 'ft' ? wireM / 0.0254 : wireM * 1000) : wire} disabled={gauge !== ''} onChange={(e) => setWire(e.target.value)} />
          <TextField label={`Centre spacing s (${dia})`} inputMode="decimal" value={spacing} onChange={(e) => setSpacing(e.target.value)} />
          <TextField label="εr (effective)" inputMode="decimal" value={twEr} onChange={(e) => setTwEr(e.target.value)} />
        </div>
        {tw.error ? (
          <Problem error={tw.error} />
        ) : (
          <Results
            testId="calc-two-wire"
            rows={[
              ...lcRows(tw.value, unit),
              ['Thin-wire Z0', `${sig(tw.value.thinWire.z0Ohm)} Ω (${tw.value.thinWireError >= 0 ? '+' : ''}${sig(tw.value.thinWireError * 100, 2)} % against acosh)`],
            ]}
          />
        )}
        {tw.value &&
          use({
            construction: 'twin-lead',
            vf: Number(tw.value.vf.toFixed(4)),
            z0Ohm: Number(tw.value.z0Ohm.toFixed(1)),
            vfSource: 'calculated',
            vfReference: `Calculated for two wires d = ${sig(wireM * 1000)} mm at s = ${spacing} ${dia}, εr = ${twEr}.`,
          })}
      </Card>

      <Card title="Delay and units">
        <div className="grid gap-3 sm:grid-cols-3">
          <TextField label="Velocity factor" inputMode="decimal" value={delayVf} onChange={(e) => setDelayVf(e.target.value)} />
          <TextField
            label="Metres"
            inputMode="decimal"
            value={meters}
            onChange={(e) => {
              setMeters(e.target.value);
              const v = num(e.target.value);
              setFeet(Number.isFinite(v) ? sig(mToFt(v), 7) : '');
            }}
          />
          <TextField
            label="Feet"
            inputMode="decimal"
            value={feet}
            onChange={(e) => {
              setFeet(e.target.value);
              const v = num(e.target.value);
              setMeters(Number.isFinite(v) ? sig(ftToM(v), 7) : '');
            }}
          />
        </div>
        {delay.error ? (
          <Problem error={delay.error} />
        ) : (
          <Results
            testId="calc-delay"
            rows={[
              ['One-way delay', `${sig(delay.value.m)} ns/m · ${sig(delay.value.ft)} ns/ft`],
              [
                'Round trip over the length',
                !Number.isFinite(num(meters)) ? '—' : num(meters) < 0 ? 'a length cannot be negative' : `${sig(2 * num(meters) * delay.value.m)} ns`,
              ],
              ['1 ft', '0.3048 m exactly'],
            ]}
          />
        )}
      </Card>
    </div>
  );
}
