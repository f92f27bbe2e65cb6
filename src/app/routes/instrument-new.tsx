import { useNavigate } from 'react-router-dom';
import { useCreateInstrument } from '@/features/instruments/api/create-instrument';
import { InstrumentForm } from '@/features/instruments/components/instrument-form';
import { toFormValues } from '@/features/instruments/components/profile-form';
import { PageHeader, Panel } from '@/components/page';

/** /instruments/new */
export function NewInstrumentRoute() {
  const create = useCreateInstrument();
  const navigate = useNavigate();
  return (
    <>
      <PageHeader title="New instrument" subtitle="Enter the nominal geometry; calibrations refine it later." />
      <Panel>
        <InstrumentForm
          initialValues={toFormValues()}
          submitLabel="Create instrument"
          pending={create.isPending}
          serverError={create.error}
          onSubmit={(body) => create.mutate(body, { onSuccess: (instrument) => navigate(`/instruments/${instrument.id}`) })}
          onCancel={() => navigate('/instruments')}
        />
      </Panel>
    </>
  );
}
