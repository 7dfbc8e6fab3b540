// Computes harmonic profiles off the main thread: a full profile takes ~100–300 ms on the bench
// tablets' class of CPU, so the page stays responsive while the drive slider moves.
import { analyse, computeProfile, gainAtDrive, periodicOutput, resolveCircuit, runContract, setupAtDrive, transferCurve, type CircuitSpec } from '../../../shared/engine/index';
import type { ProfileRequest, ProfileResponse } from './profile-messages';

function handle(req: ProfileRequest): ProfileResponse {
  const circuit = resolveCircuit(req.circuit as CircuitSpec);
  if (req.kind === 'profile') {
    const profile = computeProfile(circuit, { monteCarlo: { draws: 120, seed: 7 } });
    const threeDrives = [0.25, circuit.referenceDrive, 1].map((drive) => ({ drive, gain: gainAtDrive(circuit.drive, drive), spectrum: analyse(periodicOutput(setupAtDrive(circuit, drive)), 10) }));
    return { id: req.id, kind: 'profile', profile, threeDrives, contract: req.contract ? runContract(req.contract) : null };
  }
  if (req.kind === 'summary') return { id: req.id, kind: 'summary', profile: computeProfile(circuit, req.options) };
  const spectrum = analyse(periodicOutput(setupAtDrive(circuit, req.drive)), 10);
  const hasCap = circuit.network.shuntFarads > 0 || circuit.network.feedbackFarads > 0;
  return { id: req.id, kind: 'at', drive: req.drive, gain: gainAtDrive(circuit.drive, req.drive), spectrum, transfer: hasCap ? null : transferCurve(circuit, { drive: req.drive, points: 81 }) };
}

self.onmessage = (e: MessageEvent<ProfileRequest>) => {
  try {
    self.postMessage(handle(e.data));
  } catch (err) {
    self.postMessage({ id: e.data.id, kind: 'error', message: err instanceof Error ? err.message : String(err) } satisfies ProfileResponse);
  }
};
