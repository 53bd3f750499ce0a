/**
 * A step-TDR record with an ideal open at a chosen distance, written the way
 * an instrument exports it: `time_ns,voltage_V`, 1 ns per sample, launch at
 * 20 ns, 0.5 V incident step and a doubling at the open (ρ = +1). The
 * round-trip time is t = 2d / (VF·c) (the propagation formula d = VF·c·t/2).
 * Noise is a fixed pseudo-random sequence so every run sees the same file.
 */
export function stepTraceCsv(opts: { faultM: number; vf: number; samples?: number; spikeAt?: number }): string {
  const c = 299_792_458;
  const n = opts.samples ?? 3000;
  const launchNs = 20;
  const faultNs = launchNs + ((2 * opts.faultM) / (opts.vf * c)) * 1e9;
  let seed = 12345;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return (seed / 2147483648 - 0.5) * 0.002;
  };
  const edge = (t: number, at: number) => Math.min(1, Math.max(0, (t - at) / 2));
  const lines = ['time_ns,voltage_V'];
  for (let i = 0; i < n; i++) {
    let v = 0.5 * edge(i, launchNs) + 0.5 * edge(i, faultNs) + noise();
    if (opts.spikeAt === i) v += 0.4;
    lines.push(`${i},${v.toFixed(5)}`);
  }
  return lines.join('\n') + '\n';
}
