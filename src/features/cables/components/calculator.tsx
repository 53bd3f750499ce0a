import { useState } from 'react';
import {
  awgDiameterM,
  BASIC_FORMULAS,
  coax,
  delayNsPerFt,
  delayNsPerM,
  ftToM,
  lineFromLC,
  mToFt,
  twoWire,
  vfFromPermittivity,
} from '../../../../shared/cable/derivations';
import { M_PER_FT } from '../../../../shared/cable/propagation';
import { SelectField, TextField } from '../../../components/ui/field';
import type { LengthUnit } from '../../../lib/format';
import { ShieldedPairCard, StriplineCard, TwistedPairCard, TwoDielectricCard } from './calculator-lines';
import { attempt, CalcCard, CardOutcome, lcRows, marker, num, sig, smallLength, type CalculatedEntry } from './calculator-parts';

export type { CalculatedEntry } from './calculator-parts';

const CARDS: Array<[string, string]> = [
  ['calc-card-dielectric', 'Dielectric'],
  ['calc-card-lc', 'L and C'],
  ['calc-card-coax', 'Coax'],
  ['calc-card-two-wire', 'Two-wire'],
  ['calc-card-stripline', 'Stripline'],
  ['calc-card-twisted-pair', 'Twisted pair'],
  ['calc-card-shielded-pair', 'Shielded pair'],
  ['calc-card-two-dielectrics', 'Two dielectrics'],
  ['calc-card-delay', 'Delay and units'],
];

/**
 * The planner's calculator: VF and Z0 from the dielectric, from L and C, and
 * from the geometry of coax, two-wire, stripline, twisted and shielded pairs
 * and lines with two dielectrics; delays and m ↔ ft. Everything updates as
 * they type, every result is checked against the speed of light, and each
 * card can start a library entry that names the formula it used.
 */
export function CableCalculator({ unit, onUse }: { unit: LengthUnit; onUse?: (entry: CalculatedEntry) => void }) {
  const len = smallLength(unit);
  const dia = len.label;
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
  const cx = attempt(() =>
    coax({ outerDiameter: len.toM(num(outer)), innerDiameter: len.toM(num(inner)), epsilonR: num(coaxEr) }),
  );

  const [gauge, setGauge] = useState('');
  const [wire, setWire] = useState(unit === 'ft' ? '0.0808' : '2.053');
  const [spacing, setSpacing] = useState(unit === 'ft' ? '6' : '152.4');
  const [twEr, setTwEr] = useState('1');
  const wireM = gauge !== '' ? awgDiameterM(Number(gauge)) : len.toM(num(wire));
  const tw = attempt(() => twoWire({ wireDiameter: wireM, spacing: len.toM(num(spacing)), epsilonR: num(twEr) }));

  const [meters, setMeters] = useState('100');
  const [feet, setFeet] = useState(sig(mToFt(100), 7));
  const [delayVf, setDelayVf] = useState('0.66');
  const delayVfValue = num(delayVf);
  const delay = attempt(() => ({ m: delayNsPerM(delayVfValue), ft: delayNsPerFt(delayVfValue) }));

  return (
    <>
      <nav aria-label="Calculator cards" className="no-print mb-4 flex flex-wrap gap-2">
        {CARDS.map(([id, label]) => (
          <a
            key={id}
            href={`#${id}`}
            className="inline-flex min-h-11 items-center rounded-md border border-rule bg-card px-3 text-sm font-semibold text-teal hover:border-ink-soft"
          >
            {label}
          </a>
        ))}
      </nav>
      <div className="grid grid-cols-1 gap-4 xl:grid-cols-2">
        <CalcCard
          id="calc-card-dielectric"
          title="From the dielectric"
          intro="VF = 1/√(εr·μr). Solid PE is about 2.26, PTFE 2.1, air 1."
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField
              label="Relative permittivity εr"
              inputMode="decimal"
              value={er}
              onChange={(e) => setEr(e.target.value)}
              error={marker(perm.error, 'epsilonR')}
            />
            <TextField
              label="Relative permeability μr"
              inputMode="decimal"
              value={mr}
              onChange={(e) => setMr(e.target.value)}
              error={marker(perm.error, 'muR')}
            />
          </div>
          <CardOutcome
            result={perm}
            testId="calc-permittivity"
            onUse={onUse}
            view={(v) => ({
              vf: v,
              rows: [
                ['VF', sig(v)],
                ['Delay', unit === 'ft' ? `${sig(delayNsPerFt(v))} ns/ft` : `${sig(delayNsPerM(v))} ns/m`],
              ],
              offer: {
                formula: BASIC_FORMULAS.permittivity,
                inputs: [`εr = ${sig(num(er), 6)}`, `μr = ${sig(num(mr), 6)}`],
                vf: v,
              },
            })}
          />
        </CalcCard>

        <CalcCard
          id="calc-card-lc"
          title="From inductance and capacitance"
          intro="u = 1/√(LC), VF = u/c, Z0 = √(L/C), per unit length from a datasheet."
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField
              label={`Inductance L (nH/${unit})`}
              inputMode="decimal"
              value={l}
              onChange={(e) => setL(e.target.value)}
              error={marker(lc.error, 'lHPerM')}
            />
            <TextField
              label={`Capacitance C (pF/${unit})`}
              inputMode="decimal"
              value={c}
              onChange={(e) => setC(e.target.value)}
              error={marker(lc.error, 'cFPerM')}
            />
          </div>
          <CardOutcome
            result={lc}
            testId="calc-lc"
            onUse={onUse}
            view={(v) => ({
              vf: v.vf,
              rows: [
                ['VF', sig(v.vf)],
                ['Z0', `${sig(v.z0Ohm)} Ω`],
                [
                  'Velocity',
                  unit === 'ft' ? `${sig(v.velocityMPerS / M_PER_FT / 1e6)} ft/µs` : `${sig(v.velocityMPerS / 1e6)} m/µs`,
                ],
                ['Implied εr·μr', sig(v.epsilonMuR)],
              ],
              offer: {
                formula: BASIC_FORMULAS.lc,
                inputs: [`L = ${sig(num(l), 6)} nH/${unit}`, `C = ${sig(num(c), 6)} pF/${unit}`],
                vf: v.vf,
                z0Ohm: v.z0Ohm,
              },
            })}
          />
        </CalcCard>

        <CalcCard
          id="calc-card-coax"
          title="Coaxial line"
          intro="Z0 = (60/√εr)·ln(D/d), L = (μ/2π)·ln(D/d), C = 2πε/ln(D/d). D is the dielectric’s diameter (inside the screen), d the inner conductor’s."
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField
              label={`Dielectric diameter D (${dia})`}
              inputMode="decimal"
              value={outer}
              onChange={(e) => setOuter(e.target.value)}
              error={marker(cx.error, 'outerDiameter')}
            />
            <TextField
              label={`Inner conductor d (${dia})`}
              inputMode="decimal"
              value={inner}
              onChange={(e) => setInner(e.target.value)}
              error={marker(cx.error, 'innerDiameter')}
            />
            <TextField
              label="εr"
              inputMode="decimal"
              value={coaxEr}
              onChange={(e) => setCoaxEr(e.target.value)}
              error={marker(cx.error, 'epsilonR')}
            />
          </div>
          <CardOutcome
            result={cx}
            testId="calc-coax"
            onUse={onUse}
            view={(v) => ({
              vf: v.vf,
              rows: lcRows(v, unit, { epsilonR: num(coaxEr), muR: 1 }),
              offer: {
                formula: BASIC_FORMULAS.coax,
                inputs: [`D = ${sig(num(outer), 6)} ${dia}`, `d = ${sig(num(inner), 6)} ${dia}`, `εr = ${sig(num(coaxEr), 6)}`],
                vf: v.vf,
                z0Ohm: v.z0Ohm,
                construction: 'coax',
              },
            })}
          />
        </CalcCard>

        <CalcCard
          id="calc-card-two-wire"
          title="Two-wire line"
          intro="Z0 = (120/√εr)·acosh(s/d); when s ≫ d, the thin-wire limit L = (μ/π)·ln(2s/d), C = πε/ln(2s/d). For twin lead, whose field is partly in air, use the two-dielectric card or an effective εr (1/VF²)."
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <SelectField label="Wire gauge (AWG)" value={gauge} onChange={(e) => setGauge(e.target.value)}>
              <option value="">Type the diameter</option>
              {[10, 12, 14, 16, 18, 20, 22, 24, 26].map((g) => (
                <option key={g} value={g}>
                  No. {g} ({sig(awgDiameterM(g) * 1000, 3)} mm)
                </option>
              ))}
            </SelectField>
            <TextField
              label={`Wire diameter d (${dia})`}
              inputMode="decimal"
              value={gauge ? sig(len.fromM(wireM)) : wire}
              disabled={gauge !== ''}
              onChange={(e) => setWire(e.target.value)}
              error={marker(tw.error, 'wireDiameter')}
            />
            <TextField
              label={`Centre spacing s (${dia})`}
              inputMode="decimal"
              value={spacing}
              onChange={(e) => setSpacing(e.target.value)}
              error={marker(tw.error, 'spacing')}
            />
            <TextField
              label="εr (effective)"
              inputMode="decimal"
              value={twEr}
              onChange={(e) => setTwEr(e.target.value)}
              error={marker(tw.error, 'epsilonR')}
            />
          </div>
          <CardOutcome
            result={tw}
            testId="calc-two-wire"
            onUse={onUse}
            view={(v) => ({
              vf: v.vf,
              rows: [
                ...lcRows(v, unit, { epsilonR: num(twEr), muR: 1 }),
                [
                  'Thin-wire Z0',
                  `${sig(v.thinWire.z0Ohm)} Ω (${v.thinWireError >= 0 ? '+' : ''}${sig(v.thinWireError * 100, 2)} % against acosh)`,
                ],
              ],
              offer: {
                formula: BASIC_FORMULAS.twoWire,
                inputs: [
                  `d = ${sig(len.fromM(wireM), 4)} ${dia}${gauge ? ` (No. ${gauge})` : ''}`,
                  `s = ${sig(num(spacing), 6)} ${dia}`,
                  `εr = ${sig(num(twEr), 6)}`,
                ],
                vf: v.vf,
                z0Ohm: v.z0Ohm,
                construction: 'twin-lead',
              },
            })}
          />
        </CalcCard>

        <StriplineCard unit={unit} onUse={onUse} />
        <TwistedPairCard unit={unit} onUse={onUse} />
        <ShieldedPairCard unit={unit} onUse={onUse} />
        <TwoDielectricCard unit={unit} onUse={onUse} />

        <CalcCard
          id="calc-card-delay"
          title="Delay and units"
          intro="One-way delay at a velocity factor, and the round trip over a length."
        >
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
          <CardOutcome
            result={delay}
            testId="calc-delay"
            view={(v) => ({
              vf: delayVfValue,
              rows: [
                ['One-way delay', `${sig(v.m)} ns/m · ${sig(v.ft)} ns/ft`],
                [
                  'Round trip over the length',
                  !Number.isFinite(num(meters))
                    ? '—'
                    : num(meters) < 0
                      ? 'a length cannot be negative'
                      : `${sig(2 * num(meters) * v.m)} ns`,
                ],
                ['1 ft', '0.3048 m exactly'],
              ],
            })}
          />
        </CalcCard>
      </div>
    </>
  );
}
