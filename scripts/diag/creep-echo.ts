/**
 * Past a line's far end, what is left of a step record's working signal once the library's incident
 * creep (creep.ts) is taken out, beside the creep itself started again at that end. A resistive end
 * equal to the line's nominal Z0 does not match the line's input impedance at low frequency, which
 * series loss raises (Pozar §2.1, §2.7), so it sends back about −ρ_in(ω): the creep, reversed, from the
 * end's round trip on. For developing the engine only; tuning sets only.
 *
 *   npx tsx scripts/diag/creep-echo.ts tuning2 tuning2-023 212.16 [STEP]
 *
 * STEP: samples between printed rows (default 1000). Distances in metres from the launch.
 */
import { incidentCreep, pulseCreepRemoved, removeIncidentCreep } from '../../shared/trace/creep';
import { findLaunch } from '../../shared/trace/launch';
import { lossModelThroughLine } from '../../shared/trace/loss';
import { estimateNoise, estimateSlowNoise } from '../../shared/trace/noise';
import { parseTraceCsv } from '../../shared/trace/parse';
import { buildWorkingSignal } from '../../shared/trace/signal';
import type { TraceRecord } from '../../shared/trace/steps';
import { buildSet, type SetName } from '../sim2/sets';

const [setName, id, endArg, stepArg] = process.argv.slice(2);
if (!setName?.startsWith('tuning') || !id || !endArg)
  throw new Error('usage: creep-echo.ts tuning|tuning2|tuning3|tuning4 CASE-ID END-M [STEP] (held-out sets are not for looking at)');
const c = buildSet(setName as SetName).find((x) => x.id.includes(id));
if (!c) throw new Error(`no case ${id}`);
if (!c.loss) throw new Error('the case has no library loss');
const tr = parseTraceCsv(c.csv, (c.parseOptions ?? {}) as never);
const n = tr.amplitude.length;
const rec: TraceRecord = { y: tr.amplitude, t: tr.timeS, n, dt: (tr.timeS[n - 1] - tr.timeS[0]) / (n - 1), unit: tr.amplitudeUnit };
const sigma0 = estimateNoise(rec.y);
const hint = tr.hints.pulseWidthNs !== undefined ? (tr.hints.pulseWidthNs * 1e-9) / rec.dt : null;
const L = findLaunch(rec, 'auto', hint, estimateSlowNoise(rec.y));
const model = lossModelThroughLine(c.loss as never, c.vf);
if (!model) throw new Error('no loss model');
const fixed = pulseCreepRemoved(rec, L, model, c.vf);
const sig = buildWorkingSignal(fixed ? { ...rec, y: fixed } : rec, L, sigma0);
removeIncidentCreep(rec, L, sig, model, c.vf);
const t0 = Math.max(0, L.found && L.onsetInRecord ? L.idx : L.zeroIdx);
const creep = incidentCreep(model, c.vf, rec, t0);
const mPerSample = (c.vf * 299792458 * rec.dt) / 2;
const end = Math.round(Number(endArg) / mPerSample + L.zeroIdx);
const step = Math.max(1, Number(stepArg ?? 1000));
console.log(c.id, sig.mode, 'end at sample', end, 'of', n);
console.log('distance m | residual less its level at the end | creep from the end, reversed');
for (let i = end; i < n; i += step)
  console.log(((i - L.zeroIdx) * mPerSample).toFixed(1), (sig.u[i] - sig.u[end]).toFixed(4), (-(creep[t0 + i - end] ?? 0)).toFixed(4));
