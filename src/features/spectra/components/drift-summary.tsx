import type { SpectrumDrift } from '../../../../shared/api/spectra.ts';

/** The frame's shift against the calibration that made its spectrum, and whether it is flagged. */
export function DriftSummary({ drift }: { drift: SpectrumDrift }) {
  if (drift.shiftPx === null) {
    return <p className="text-sm text-slate-600" data-testid="drift-summary">No drift measured: {drift.matchedPeaks} peak(s) matched the predicted orders (needs at least one).</p>;
  }
  const sigma = drift.shiftPxSigma ?? 0;
  return (
    <div className="flex flex-wrap items-center gap-3 text-sm" data-testid="drift-summary" data-flagged={drift.flagged}>
      {drift.flagged ? (
        <span className="rounded bg-amber-100 px-2 py-0.5 font-medium text-amber-900 ring-1 ring-amber-300">drift flagged</span>
      ) : (
        <span className="rounded bg-accent-50 px-2 py-0.5 font-medium text-accent-800 ring-1 ring-accent-100">within threshold</span>
      )}
      <span className="tabular-nums">
        shift {drift.shiftPx.toFixed(2)} ± {sigma.toFixed(2)} px
        {drift.shiftMeV !== null ? ` (${drift.shiftMeV.toFixed(1)} ± ${(drift.shiftMeVSigma ?? 0).toFixed(1)} meV)` : ''}
      </span>
      <span className="text-slate-500">
        from {drift.matchedPeaks} matched peaks · threshold {drift.threshold.sigma} σ and {drift.threshold.px} px
      </span>
    </div>
  );
}
