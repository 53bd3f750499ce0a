/**
 * Looks inside the engine on one case of a tuning set: the truth, the launch, every detection candidate and
 * the reported events. For developing the engine only; it refuses the held-out sets.
 *
 *   npx tsx scripts/sim2/inspect.ts tuning3 tuning3-000
 */
import { parseTraceCsv } from '../../shared/trace/parse';
import { analyzeTrace } from '../../shared/trace/analyze';
import { estimateNoise, estimateSlowNoise } from '../../shared/trace/noise';
import { findLaunch } from '../../shared/trace/launch';
import { buildWorkingSignal } from '../../shared/trace/signal';
import { detectEdges, FALSE_EVENTS_PER_TRACE } from '../../shared/trace/detection';
import type { TraceRecord } from '../../shared/trace/steps';
import { buildSet, type SetName } from './sets';

const [setName, id] = process.argv.slice(2);
if (!setName?.startsWith('tuning') || !id) throw new Error('usage: inspect.ts tuning|tuning2|tuning3|tuning4 CASE-ID (held-out sets are not for looking at)');
const c = buildSet(setName as SetName).find((x) => x.id.includes(id))!;
console.log(c.id, 'vf', c.vf, 'z0', c.z0Ohm, 'mode', c.mode);
for (const e of c.expected) console.log('  exp', e.distanceM.toFixed(2), e.type, e.what, e.required ? `(snrEff ${e.snrEff})` : `(opt: ${e.why})`, 'rho', e.rho.toFixed(3), 'seen', e.rhoSeen.toFixed(3));
const tr = parseTraceCsv(c.csv, (c.parseOptions ?? {}) as never);
const rec: TraceRecord = { y: tr.amplitude, t: tr.timeS, n: tr.amplitude.length, dt: (tr.timeS[tr.timeS.length - 1] - tr.timeS[0]) / (tr.amplitude.length - 1), unit: tr.amplitudeUnit };
const sigma0 = estimateNoise(rec.y);
const L = findLaunch(rec, 'auto', tr.hints.pulseWidthNs !== undefined ? (tr.hints.pulseWidthNs * 1e-9) / rec.dt : null, estimateSlowNoise(rec.y));
console.log('n', rec.n, 'dt ns', (rec.dt * 1e9).toFixed(4), 'sigma0', sigma0.toExponential(3), 'launch', { idx: L.idx, height: L.height, mode: L.mode, found: L.found, rise: L.riseSamples, width: L.widthSamples, zeroIdx: L.zeroIdx });
const sig = buildWorkingSignal(rec, L, sigma0);
const det = detectEdges(sig, { falseEventsPerTrace: FALSE_EVENTS_PER_TRACE, rhoMin: 0.005 });
const mPerS = (c.vf * 299792458 * rec.dt) / 2;
console.log('k', det.thresholdSigma.toFixed(2), 'start', sig.start, 'blind', sig.blindIdx, 'w0', sig.w0, 'm/sample', mPerS.toFixed(4), 'sigmaU', sig.sigmaU);
for (const cd of det.candidates) console.log('  cand i', cd.i, '~m', ((cd.i - L.zeroIdx) * mPerS).toFixed(2), 'w', cd.w, 'sign', cd.sign, 'f', cd.f.toFixed(4), 'snr', cd.snr.toFixed(1));
const a = analyzeTrace(tr, { vf: c.vf, z0Ohm: c.z0Ohm, loss: c.loss as never });
for (const e of a.events) console.log('  evt', e.distanceM.toFixed(2), e.type, 'rho', e.reflectionCoefficient.toFixed(3), 'raw', (e.reflectionCoefficientRaw ?? NaN).toFixed(3), 'snr', e.snr.toFixed(1), 'mult', e.likelyMultipleOf, '±', e.uncertaintyM.toFixed(2));
for (const w of a.warnings) console.log('  warn', w.code, w.message.slice(0, 140));
