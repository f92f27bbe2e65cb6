import { Link } from 'react-router-dom';
import { useSession } from '@/features/auth/api/get-session';
import { useInstruments } from '@/features/instruments/api/get-instruments';
import { InstrumentsTable } from '@/features/instruments/components/instruments-table';
import { EmptyState, Loading, PageHeader } from '@/components/page';
import { ErrorAlert } from '@/components/alert';
import { useVersions } from '@/features/versions/api/get-versions';
import { calibrationStatus } from '@/features/versions/lib/calibration-status';
import { useInstrumentSpectra } from '@/features/spectra/api/get-instrument-spectra';
import { driftFlaggedFrameCount } from '@/features/spectra/lib/drift-flags';

/**
 * "version N in force · M in review · K drift flags" for one instrument. It reads the same two
 * queries as the instrument page (versions, spectra list), so opening an instrument afterwards
 * costs no new requests for them.
 */
function InstrumentStatusLine({ instrumentId }: { instrumentId: string }) {
  const versions = useVersions(instrumentId);
  const spectra = useInstrumentSpectra(instrumentId);
  if (versions.isPending || spectra.isPending) return <span>…</span>;
  if (versions.isError || spectra.isError) return <span>status unavailable</span>;
  const { inForce, inReview } = calibrationStatus(versions.data, Date.now());
  const flags = driftFlaggedFrameCount(spectra.data.items);
  return (
    <span data-testid="instrument-status">
      {inForce ? `version ${inForce.number} in force` : 'no version in force'} · {inReview.length} in review ·{' '}
      <span className={flags > 0 ? 'font-medium text-red-700' : ''}>
        {flags} drift flag{flags === 1 ? '' : 's'}
      </span>
    </span>
  );
}

/** /instruments: the instruments you can see, and "New instrument". */
export function InstrumentsRoute() {
  const session = useSession();
  const instruments = useInstruments();
  const isAdmin = Boolean(session.data?.user?.isAdmin);

  return (
    <>
      <PageHeader
        title="Instruments"
        subtitle="Each instrument is one spectrometer and camera configuration with its nominal profile."
        actions={
          <Link to="/instruments/new" className="rounded-md bg-accent-700 px-3.5 py-2 text-sm font-medium text-white shadow-xs hover:bg-accent-800">
            New instrument
          </Link>
        }
      />
      {instruments.isPending ? (
        <Loading what="Loading instruments" />
      ) : instruments.isError ? (
        <ErrorAlert error={instruments.error} title="Could not load the instruments" />
      ) : instruments.data.length === 0 ? (
        <EmptyState>No instruments yet. Create one, or ask an owner to invite you to theirs.</EmptyState>
      ) : (
        <InstrumentsTable instruments={instruments.data} isAdmin={isAdmin} status={(i) => <InstrumentStatusLine instrumentId={i.id} />} />
      )}
    </>
  );
}
