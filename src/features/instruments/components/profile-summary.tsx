import type { InstrumentProfileInput } from '../../../../shared/api/instrument-profile.ts';

/** One line for tables: "1200 lines/mm · 87° incidence". */
export function spectrometerSummary(profile: InstrumentProfileInput): string {
  return `${formatNumber(profile.grooveDensityPerMm)} lines/mm · ${formatNumber(profile.incidenceAngleDeg)}° incidence`;
}

function formatNumber(value: number | undefined): string {
  if (value === undefined) return '—';
  return Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(6)));
}

/** The profile as a definition list with units. */
export function ProfileSummary({ profile }: { profile: InstrumentProfileInput }) {
  const rows: [string, string][] = [
    ['Groove density', `${formatNumber(profile.grooveDensityPerMm)} lines/mm`],
    ['Incidence angle', `${formatNumber(profile.incidenceAngleDeg)}° from normal`],
    ['Grating–detector distance', `${formatNumber(profile.detectorDistanceMm)} mm`],
    ['Pixel pitch', `${formatNumber(profile.pixelPitchUm)} µm`],
    ['Spectral pixels', formatNumber(profile.pixelCount)],
    ['Spectral axis', profile.spectralAxis === 'x' ? 'x (columns)' : 'y (rows)'],
    ['Wavelength', profile.wavelengthIncreasesWithPixel ? 'increases with pixel index' : 'decreases with pixel index'],
    ['Detector centre pixel', formatNumber(profile.detectorCenterPixel)],
    ['Diffraction angle at centre', profile.detectorAngleDeg === undefined ? '—' : `${formatNumber(profile.detectorAngleDeg)}°`],
    ['Camera tilt', profile.detectorTiltDeg === undefined ? 'not stated (searched)' : `${formatNumber(profile.detectorTiltDeg)}°`],
  ];
  return (
    <div>
      <dl className="grid grid-cols-1 gap-x-8 gap-y-3 sm:grid-cols-2">
        {rows.map(([label, value]) => (
          <div key={label} className="flex justify-between gap-4 border-b border-slate-100 pb-2">
            <dt className="text-sm text-slate-500">{label}</dt>
            <dd className="text-sm font-medium text-slate-900 tabular-nums">{value}</dd>
          </div>
        ))}
      </dl>
      {profile.notes ? <p className="mt-4 text-sm whitespace-pre-line text-slate-700">{profile.notes}</p> : null}
    </div>
  );
}
