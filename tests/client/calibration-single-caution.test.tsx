import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { CalibrationProposal, proposalDefaults } from '../../src/features/calibrations/components/calibration-proposal';
import { noCalibrations, pendingCalibration } from './support/fixtures';

afterEach(cleanup);

const none = noCalibrations;
const one = { count: 1, mean: 0.655, stdDev: null, min: 0.655, max: 0.655 };
// A close-out on a 45 m run: the found position is the known length.
const calibration = pendingCalibration({ knownLengthM: 45, roundTripNs: 464.6 });

function proposal(acceptedVfs: number[], unit: 'm' | 'ft' = 'm') {
  render(
    <CalibrationProposal
      calibration={calibration}
      accepted={acceptedVfs.length ? one : none}
      acceptedVfs={acceptedVfs}
      libraryVf={0.66}
      libraryVfTolerance={0.04}
      values={proposalDefaults(calibration, acceptedVfs, 0.04)}
      onValues={() => {}}
      errors={{}}
      unit={unit}
    />,
  );
}

describe('the calibration proposal resting on one calibration', () => {
  it('cautions that one cable shows no spread and that on a short run ±0.5 m is a large share, leaving the planner to decide', () => {
    proposal([]);
    // The tightening it cautions about: ±4 % in the library, ±2 % proposed from this one close-out.
    expect(screen.getByLabelText('Tolerance (± %)')).toHaveProperty('value', '2.0');
    // Hand-worked: 0.5 / 45 = 1.11 %.
    expect(screen.getByRole('note').textContent).toBe(
      'Caution: this rests on a single calibration. One cable shows nothing of the spread between cables of this type. On a short run a small error in the found position is a large share of the length: as an example, ±0.50 m on this 45.0 m is ±1.1 %, and the VF it gives moves by the same share. You decide what to store.',
    );
  });

  it('gives the example in the reader’s unit', () => {
    proposal([], 'ft');
    // 0.5 m = 1.64 ft, 45 m = 147.6 ft; the share is the same.
    expect(screen.getByRole('note').textContent).toContain('as an example, ±1.64 ft on this 147.6 ft is ±1.1 %,');
  });

  it('says nothing of the kind once other accepted calibrations stand beside it', () => {
    proposal([0.655]);
    expect(screen.queryByTestId('single-calibration-caution')).toBeNull();
  });
});
