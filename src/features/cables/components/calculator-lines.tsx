import { useState } from 'react';
import { awgDiameterM } from '../../../../shared/cable/derivations';
import { shieldedPair } from '../../../../shared/cable/geometries/shielded-pair';
import { stripline } from '../../../../shared/cable/geometries/stripline';
import { twistedPair, type FilmKind, type TwistedPairMethod } from '../../../../shared/cable/geometries/twisted-pair';
import { twoDielectricLine, type MixingRule } from '../../../../shared/cable/geometries/two-dielectrics';
import { SelectField, TextField } from '../../../components/ui/field';
import type { LengthUnit } from '../../../lib/format';
import {
  attempt,
  CalcCard,
  CardOutcome,
  lcRows,
  marker,
  num,
  sig,
  smallLength,
  type CalculatedEntry,
  type Row,
} from './calculator-parts';

interface CardProps {
  unit: LengthUnit;
  onUse?: (entry: CalculatedEntry) => void;
}

const GAUGES = [10, 12, 14, 16, 18, 19, 20, 22, 24, 26];

function GaugeField({ label, value, onChange }: { label: string; value: string; onChange: (v: string) => void }) {
  return (
    <SelectField label={label} value={value} onChange={(e) => onChange(e.target.value)}>
      <option value="">Type the diameter</option>
      {GAUGES.map((g) => (
        <option key={g} value={g}>
          No. {g} ({sig(awgDiameterM(g) * 1000, 3)} mm)
        </option>
      ))}
    </SelectField>
  );
}

export function StriplineCard({ unit, onUse }: CardProps) {
  const len = smallLength(unit);
  const [w, setW] = useState(unit === 'ft' ? '0.1047' : '2.66');
  const [b, setB] = useState(unit === 'ft' ? '0.126' : '3.2');
  const [t, setT] = useState('0');
  const [er, setEr] = useState('2.2');
  const r = attempt(() =>
    stripline({ width: len.toM(num(w)), groundSpacing: len.toM(num(b)), thickness: len.toM(num(t)), epsilonR: num(er) }),
  );
  return (
    <CalcCard
      id="calc-card-stripline"
      title="Stripline"
      intro="A flat strip centred between two ground planes, as in jumpers and test fixtures. A thin strip (t = 0) is worked out exactly; a strip with thickness by the wide- or narrow-strip form."
    >
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField
          label={`Strip width W (${len.label})`}
          inputMode="decimal"
          value={w}
          onChange={(e) => setW(e.target.value)}
          error={marker(r.error, 'width')}
        />
        <TextField
          label={`Plane-to-plane spacing b (${len.label})`}
          inputMode="decimal"
          value={b}
          onChange={(e) => setB(e.target.value)}
          error={marker(r.error, 'groundSpacing')}
        />
        <TextField
          label={`Strip thickness t (${len.label})`}
          inputMode="decimal"
          value={t}
          onChange={(e) => setT(e.target.value)}
          error={marker(r.error, 'thickness')}
          hint="0 for a thin strip"
        />
        <TextField
          label="Laminate εr"
          inputMode="decimal"
          value={er}
          onChange={(e) => setEr(e.target.value)}
          error={marker(r.error, 'epsilonR')}
          hint="PTFE laminate about 2.2, glass-epoxy about 4.3"
        />
      </div>
      <CardOutcome
        result={r}
        testId="calc-stripline"
        onUse={onUse}
        view={(v) => ({
          vf: v.vf,
          rows: [
            ...lcRows(v, unit, { epsilonR: num(er), muR: 1 }),
            ...(num(t) > 0 ? ([['Thin-strip Z0 (exact)', `${sig(v.thinStripZ0Ohm)} Ω`]] satisfies Row[]) : []),
          ],
          offer: {
            formula: v.formula,
            inputs: [
              `W = ${sig(num(w), 6)} ${len.label}`,
              `b = ${sig(num(b), 6)} ${len.label}`,
              `t = ${sig(num(t), 6)} ${len.label}`,
              `εr = ${sig(num(er), 6)}`,
            ],
            vf: v.vf,
            z0Ohm: v.z0Ohm,
            construction: 'other',
          },
        })}
      />
    </CalcCard>
  );
}

export function TwistedPairCard({ unit, onUse }: CardProps) {
  const len = smallLength(unit);
  const [method, setMethod] = useState<TwistedPairMethod>('touching');
  const [gauge, setGauge] = useState('24');
  const [wire, setWire] = useState(unit === 'ft' ? '0.0201' : '0.511');
  const [insulated, setInsulated] = useState(unit === 'ft' ? '0.037' : '0.94');
  const [er, setEr] = useState('2.26');
  const [lay, setLay] = useState(unit === 'ft' ? '0.2' : '5');
  const [film, setFilm] = useState<FilmKind>('film');
  const wireM = gauge !== '' ? awgDiameterM(Number(gauge)) : len.toM(num(wire));
  const r = attempt(() =>
    twistedPair({
      method,
      wireDiameter: wireM,
      centreSpacing: len.toM(num(insulated)),
      insulationEpsilonR: num(er),
      layLength: len.toM(num(lay)),
      film,
    }),
  );
  return (
    <CalcCard
      id="calc-card-twisted-pair"
      title="Twisted pair"
      intro="Two insulated wires twisted together. Part of the field runs in the insulation and part in the air around it; the effective εr says how much."
    >
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Insulation" value={method} onChange={(e) => setMethod(e.target.value as TwistedPairMethod)}>
          <option value="touching">Thick, wires touching</option>
          <option value="twist">Film, with the twist</option>
        </SelectField>
        <GaugeField label="Conductor gauge (AWG)" value={gauge} onChange={setGauge} />
        <TextField
          label={`Conductor diameter d (${len.label})`}
          inputMode="decimal"
          value={gauge ? sig(len.fromM(wireM)) : wire}
          disabled={gauge !== ''}
          onChange={(e) => setWire(e.target.value)}
          error={marker(r.error, 'wireDiameter')}
        />
        <TextField
          label={`Centre spacing D (${len.label})`}
          inputMode="decimal"
          value={insulated}
          onChange={(e) => setInsulated(e.target.value)}
          error={marker(r.error, 'centreSpacing')}
          hint="The insulated wire’s diameter, as the insulation touches"
        />
        <TextField
          label="Insulation εr"
          inputMode="decimal"
          value={er}
          onChange={(e) => setEr(e.target.value)}
          error={marker(r.error, 'insulationEpsilonR')}
          hint="Solid PE 2.26, FEP 2.1, PVC 3.5–5"
        />
        {method === 'twist' && (
          <>
            <TextField
              label={`Lay length, one full twist (${len.label})`}
              inputMode="decimal"
              value={lay}
              onChange={(e) => setLay(e.target.value)}
              error={marker(r.error, 'layLength')}
            />
            <SelectField label="Film" value={film} onChange={(e) => setFilm(e.target.value as FilmKind)}>
              <option value="film">Enamel film</option>
              <option value="ptfe">PTFE film (softer)</option>
            </SelectField>
          </>
        )}
      </div>
      <CardOutcome
        result={r}
        testId="calc-twisted-pair"
        onUse={onUse}
        view={(v) => ({
          vf: v.vf,
          rows: [
            ['Effective εr', sig(v.epsilonEff)],
            ...(v.twistAngleDeg !== undefined
              ? ([
                  ['Pitch angle θ', `${sig(v.twistAngleDeg, 3)}°`],
                  ['Share in the film, q', sig(v.q ?? Number.NaN, 3)],
                ] satisfies Row[])
              : []),
            ...lcRows(v, unit, { epsilonR: v.epsilonEff, muR: 1, effective: true }),
          ],
          offer: {
            formula: v.formula,
            inputs: [
              `d = ${sig(len.fromM(wireM), 4)} ${len.label}${gauge ? ` (No. ${gauge})` : ''}`,
              `D = ${sig(num(insulated), 6)} ${len.label}`,
              `insulation εr = ${sig(num(er), 6)}`,
              ...(method === 'twist'
                ? [`lay = ${sig(num(lay), 6)} ${len.label}`, film === 'ptfe' ? 'PTFE film' : 'enamel film']
                : []),
            ],
            vf: v.vf,
            z0Ohm: v.z0Ohm,
            construction: 'twisted-pair',
          },
        })}
      />
    </CalcCard>
  );
}

export function ShieldedPairCard({ unit, onUse }: CardProps) {
  const len = smallLength(unit);
  const [wire, setWire] = useState(unit === 'ft' ? '0.032' : '0.8');
  const [spacing, setSpacing] = useState(unit === 'ft' ? '0.12' : '3');
  const [shield, setShield] = useState(unit === 'ft' ? '0.32' : '8');
  const [er, setEr] = useState('2.26');
  const r = attempt(() =>
    shieldedPair({
      wireDiameter: len.toM(num(wire)),
      spacing: len.toM(num(spacing)),
      shieldDiameter: len.toM(num(shield)),
      epsilonR: num(er),
    }),
  );
  return (
    <CalcCard
      id="calc-card-shielded-pair"
      title="Shielded pair"
      intro="Two wires side by side inside a round screen, measured wire against wire. The screen lowers Z0 below the same pair in the open."
    >
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField
          label={`Wire diameter d (${len.label})`}
          inputMode="decimal"
          value={wire}
          onChange={(e) => setWire(e.target.value)}
          error={marker(r.error, 'wireDiameter')}
        />
        <TextField
          label={`Wire spacing h (${len.label})`}
          hint="Centre to centre"
          inputMode="decimal"
          value={spacing}
          onChange={(e) => setSpacing(e.target.value)}
          error={marker(r.error, 'spacing')}
        />
        <TextField
          label={`Screen inside diameter (${len.label})`}
          inputMode="decimal"
          value={shield}
          onChange={(e) => setShield(e.target.value)}
          error={marker(r.error, 'shieldDiameter')}
        />
        <TextField
          label="Filling εr"
          inputMode="decimal"
          value={er}
          onChange={(e) => setEr(e.target.value)}
          error={marker(r.error, 'epsilonR')}
        />
      </div>
      <CardOutcome
        result={r}
        testId="calc-shielded-pair"
        onUse={onUse}
        view={(v) => ({
          vf: v.vf,
          rows: [...lcRows(v, unit, { epsilonR: num(er), muR: 1 }), ['Without the screen', `${sig(v.unshieldedZ0Ohm)} Ω`]],
          offer: {
            formula: v.formula,
            inputs: [
              `d = ${sig(num(wire), 6)} ${len.label}`,
              `h = ${sig(num(spacing), 6)} ${len.label}`,
              `D = ${sig(num(shield), 6)} ${len.label}`,
              `εr = ${sig(num(er), 6)}`,
            ],
            vf: v.vf,
            z0Ohm: v.z0Ohm,
            construction: 'other',
          },
        })}
      />
    </CalcCard>
  );
}

const RULE_LABELS: Record<MixingRule, string> = {
  parallel: 'Side by side (web and air)',
  series: 'In layers (tube, gas gap)',
  foam: 'Finely mixed (foam)',
};

export function TwoDielectricCard({ unit, onUse }: CardProps) {
  const len = smallLength(unit);
  const [kind, setKind] = useState<'two-wire' | 'coax'>('two-wire');
  const [a, setA] = useState(unit === 'ft' ? '0.032' : '0.812'); // wire or centre conductor
  const [bDim, setBDim] = useState(unit === 'ft' ? '0.295' : '7.5'); // spacing or screen
  const [e1, setE1] = useState('1');
  const [e2, setE2] = useState('2.26');
  const [q, setQ] = useState('0.3');
  const [rule, setRule] = useState<MixingRule>('parallel');
  const geometry =
    kind === 'coax'
      ? { kind, innerDiameter: len.toM(num(a)), outerDiameter: len.toM(num(bDim)) }
      : { kind, wireDiameter: len.toM(num(a)), spacing: len.toM(num(bDim)) };
  const r = attempt(() => twoDielectricLine({ geometry, epsilon1: num(e1), epsilon2: num(e2), fraction: num(q), rule }));
  return (
    <CalcCard
      id="calc-card-two-dielectrics"
      title="Two dielectrics"
      intro="Foam, semi-air-spaced coax, twin lead with its web: the field runs through two materials. Say how much of it is in the second one (q) and how the two meet."
    >
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Line" value={kind} onChange={(e) => setKind(e.target.value as 'two-wire' | 'coax')}>
          <option value="two-wire">Two wires (twin lead)</option>
          <option value="coax">Coax</option>
        </SelectField>
        <SelectField label="How the two materials meet" value={rule} onChange={(e) => setRule(e.target.value as MixingRule)}>
          {(Object.keys(RULE_LABELS) as MixingRule[]).map((k) => (
            <option key={k} value={k}>
              {RULE_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <TextField
          label={kind === 'coax' ? `Centre conductor d (${len.label})` : `Wire diameter d (${len.label})`}
          inputMode="decimal"
          value={a}
          onChange={(e) => setA(e.target.value)}
          error={marker(r.error, 'innerDiameter', 'wireDiameter')}
        />
        <TextField
          label={kind === 'coax' ? `Inside of the screen D (${len.label})` : `Centre spacing s (${len.label})`}
          inputMode="decimal"
          value={bDim}
          onChange={(e) => setBDim(e.target.value)}
          error={marker(r.error, 'outerDiameter', 'spacing')}
        />
        <TextField
          label="Material 1 εr"
          inputMode="decimal"
          value={e1}
          onChange={(e) => setE1(e.target.value)}
          error={marker(r.error, 'epsilon1')}
          hint="Air or gas: 1"
        />
        <TextField
          label="Material 2 εr"
          inputMode="decimal"
          value={e2}
          onChange={(e) => setE2(e.target.value)}
          error={marker(r.error, 'epsilon2')}
          hint="Solid PE 2.26, PTFE 2.1"
        />
        <TextField
          label="Share of material 2, q (0–1)"
          inputMode="decimal"
          value={q}
          onChange={(e) => setQ(e.target.value)}
          error={marker(r.error, 'fraction')}
          hint={rule === 'foam' ? 'For a foam: its density over the solid’s' : 'The share of the field in material 2'}
        />
      </div>
      <CardOutcome
        result={r}
        testId="calc-two-dielectrics"
        onUse={onUse}
        view={(v) => ({
          vf: v.vf,
          rows: [
            ['Effective εr', sig(v.epsilonEff)],
            ['Z0 in air', `${sig(v.z0AirOhm)} Ω`],
            ...lcRows(v, unit, { epsilonR: v.epsilonEff, muR: 1, effective: true }),
            ['Bounds at this q', `VF ${sig(v.vfRange.slowest, 3)} to ${sig(v.vfRange.fastest, 3)}`],
          ],
          offer: {
            formula: v.formula,
            inputs: [
              kind === 'coax'
                ? `coax d = ${sig(num(a), 6)} ${len.label}, D = ${sig(num(bDim), 6)} ${len.label}`
                : `two wires d = ${sig(num(a), 6)} ${len.label} at s = ${sig(num(bDim), 6)} ${len.label}`,
              `ε1 = ${sig(num(e1), 6)}`,
              `ε2 = ${sig(num(e2), 6)}`,
              `q = ${sig(num(q), 6)}`,
            ],
            vf: v.vf,
            z0Ohm: v.z0Ohm,
            construction: kind === 'coax' ? 'coax' : 'twin-lead',
          },
        })}
      />
    </CalcCard>
  );
}
