import type { CalibrateResult } from '../../../../shared/engine/calibrate.ts';
import { Alert } from '@/components/alert';

/**
 * The run's verdict in words. For `ambiguous` it says what would decide it: a pin, a known line,
 * a filter edge in range, or a wider range (more lines on the camera), with the engine's own message.
 */
export function AmbiguityBanner({ result }: { result: CalibrateResult }) {
  if (result.status === 'unique') {
    return (
      <Alert tone="success" title="The orders are decided (unique)">
        {result.message}
      </Alert>
    );
  }
  if (result.status === 'failed') {
    return <Alert title="The engine could not calibrate this frame">{result.message}</Alert>;
  }
  const [first, second] = result.hypotheses;
  return (
    <div role="alert" className="rounded-md border-2 border-amber-400 bg-amber-50 px-4 py-3 text-sm text-amber-950" data-testid="ambiguous-banner">
      <p className="font-semibold">Ambiguous: the data cannot decide the harmonic orders.</p>
      <p className="mt-1">{result.message}</p>
      {first && second ? (
        <p className="mt-1">
          The best hypothesis starts at order {first.firstHarmonic}; the next (order {second.firstHarmonic}) is only {second.deltaScore.toFixed(1)} worse in score.
        </p>
      ) : null}
      <p className="mt-2 font-medium">What would decide it:</p>
      <ul className="mt-1 list-disc pl-5">
        <li>
          <strong>a pin</strong> — if you know the order of one peak (e.g. from a filter cut-off seen earlier), use <em>Pin order…</em> in the peaks table, or <em>Use this</em> on a hypothesis;
        </li>
        <li>
          <strong>a known line</strong> — a peak whose photon energy you know (an emission line, or a harmonic measured elsewhere): use <em>Known energy…</em> in the peaks table; it
          also anchors the absolute scale;
        </li>
        <li>
          <strong>a filter edge</strong> — a frame through a filter whose absorption edge falls inside the camera&apos;s range (its edge energy is taken from the reference tables), with that filter listed below;
        </li>
        <li>
          <strong>a wider range</strong> — more harmonics on the camera (a frame with more lines), or a tighter driver tolerance if the laser&apos;s centre wavelength is known better.
        </li>
      </ul>
      <p className="mt-2">A draft can be saved only once the result is unique.</p>
    </div>
  );
}
