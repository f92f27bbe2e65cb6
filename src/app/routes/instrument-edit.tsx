import { useNavigate, useParams } from 'react-router-dom';
import { useInstrument } from '@/features/instruments/api/get-instrument';
import { useUpdateInstrument } from '@/features/instruments/api/update-instrument';
import { InstrumentForm } from '@/features/instruments/components/instrument-form';
import { toFormValues } from '@/features/instruments/components/profile-form';
import { Loading, PageHeader, Panel } from '@/components/page';
import { ErrorAlert } from '@/components/alert';

/** /instruments/:instrumentId/edit */
export function EditInstrumentRoute() {
  const { instrumentId = '' } = useParams();
  const instrument = useInstrument(instrumentId);
  const update = useUpdateInstrument(instrumentId);
  const navigate = useNavigate();

  if (instrument.isPending) return <Loading what="Loading instrument" />;
  if (instrument.isError) return <ErrorAlert error={instrument.error} title="Could not load the instrument" />;

  return (
    <>
      <PageHeader title={`Edit ${instrument.data.name}`} subtitle="Changing the profile does not change existing calibrations." />
      <Panel>
        <InstrumentForm
          // A new key per loaded version so the form starts from what the server holds.
          key={instrument.data.updatedAt}
          initialValues={toFormValues(instrument.data)}
          submitLabel="Save changes"
          pending={update.isPending}
          serverError={update.error}
          onSubmit={(body) => update.mutate(body, { onSuccess: () => navigate(`/instruments/${instrumentId}`) })}
          onCancel={() => navigate(`/instruments/${instrumentId}`)}
        />
      </Panel>
    </>
  );
}
